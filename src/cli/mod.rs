//! The command-line layer: arguments, validated settings, limits, commands, warnings, progress
//! and atomic output.

pub mod args;
pub mod check;
pub mod commands;
pub mod describe;
pub mod detected;
pub mod figures;
pub mod fit;
pub mod interrupt;
pub mod limits;
pub mod output;
pub mod progress;
pub mod provenance;
pub mod scan;
pub mod settings;
pub mod warnings;
