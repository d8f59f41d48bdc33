//! The command-line layer: arguments, validated settings, commands and atomic output.

pub mod args;
pub mod commands;
pub mod output;
pub mod settings;
