//! What the figures say about a run: the title block (target, every laser parameter, models,
//! method), the axis conventions (odd orders, half cycles apart or not) and the cutoffs, per
//! half cycle where the half cycles differ.

use serde_json::Value;

use holecast::cutoff::{Cutoffs, half_cycle_cutoffs};
use holecast::field::{Field, TimeStructure};
use holecast::grid::inversion_symmetric;
use holecast::laser::{EnvelopeSpec, LaserSpec};
use holecast::orbits::{ChannelPair, OrbitSettings};
use holecast::report::svg::{FigureContext, HalfCycleMark, Marker};
use holecast::target::Target;
use holecast::units;

use super::describe::{ionization_text, laser_lines, orientation_text, recombination_text};

/// Everything about a run that its figures describe.
pub struct RunDescription<'a> {
    /// The target.
    pub target: &'a Target,
    /// The laser as given.
    pub laser: &'a LaserSpec,
    /// The field.
    pub field: &'a Field,
    /// Trajectory-stage settings (for the per-half-cycle cutoffs).
    pub orbit: &'a OrbitSettings,
    /// Cutoffs of the reference channel.
    pub cutoff: &'a Cutoffs,
    /// Index of the reference channel.
    pub reference: usize,
    /// The `approximations` object of the run's metadata.
    pub approximations: &'a Value,
}

/// First word of a model description (its name).
fn model_name(text: &str) -> &str {
    text.split(' ').next().unwrap_or(text)
}

/// The method line from the run's `approximations`.
fn method_line(a: &Value) -> String {
    let get = |k: &str| a.get(k).and_then(Value::as_str).unwrap_or("?").to_string();
    match a.get("method").and_then(Value::as_str) {
        Some("quadrature") => format!(
            "method: quadrature (time integrals on real times, no saddle points), momentum \
             integral {}",
            get("momentum")
        ),
        _ => format!(
            "method: saddle points, {} sum of short/long pairs; hole at {} times, {} hole \
             expansion; structure in the {} (ionization) and {} (recombination)",
            get("saddle_sum"),
            get("hole_times"),
            get("hole_expansion"),
            get("ionization_structure"),
            get("recombination_structure")
        ),
    }
}

/// The continuous field with the laser's colours (a pulse's peak), if it can be built.
fn continuous(laser: &LaserSpec) -> Option<Field> {
    let mut cw = laser.clone();
    cw.envelope = EnvelopeSpec::Continuous {};
    cw.to_field().ok()
}

/// The figure context of a run; `what` completes the title (e.g. "harmonic spectrum").
pub fn context(d: &RunDescription<'_>, what: &str) -> FigureContext {
    let t = d.target;
    let field = d.field;
    let omega = field.omega();
    let periodic = matches!(field.structure(), TimeStructure::Periodic { .. });
    let symmetric_target = inversion_symmetric(t);
    let half_wave = periodic && field.half_wave_symmetric() && symmetric_target;
    let odd_orders = symmetric_target
        && if periodic {
            field.half_wave_symmetric()
        } else {
            continuous(d.laser).is_some_and(|f| f.half_wave_symmetric())
        };
    let reference = &t.channels[d.reference.min(t.channels.len() - 1)];
    let pair = ChannelPair::single(reference.ip);
    let half_cycles: Vec<HalfCycleMark> = half_cycle_cutoffs(field, pair, d.orbit)
        .map(|r| {
            r.half_cycles
                .iter()
                .filter_map(|(h, c)| {
                    c.estimate(pair).map(|cutoff| HalfCycleMark {
                        half_cycle: *h,
                        cutoff,
                    })
                })
                .collect()
        })
        .unwrap_or_default();
    let split = periodic && !half_wave;
    let strongest = d
        .cutoff
        .strongest_half_cycle
        .map(|h| format!(" (strongest half cycle, {h})"))
        .unwrap_or_default();
    let mut markers = vec![Marker {
        label: format!("classical cutoff{strongest}"),
        order: d.cutoff.classical / omega,
    }];
    if split && half_cycles.len() > 1 {
        for h in &half_cycles {
            markers.push(Marker {
                label: format!("quantum cutoff of half cycle {}", h.half_cycle),
                order: h.cutoff / omega,
            });
        }
    } else if let Some(q) = d.cutoff.quantum {
        markers.push(Marker {
            label: if periodic {
                "quantum cutoff".to_string()
            } else {
                format!("quantum cutoff{strongest}")
            },
            order: q / omega,
        });
    }
    let channels: Vec<String> = t
        .channels
        .iter()
        .map(|c| {
            format!(
                "{} {:.2} eV (ionization {}, recombination {})",
                c.label,
                units::au_to_ev(c.ip),
                model_name(&ionization_text(&c.ionization)),
                model_name(&recombination_text(&c.recombination))
            )
        })
        .collect();
    let details = vec![
        format!(
            "laser: {}; Up = {:.2} eV",
            laser_lines(d.laser).join("; "),
            units::au_to_ev(field.ponderomotive_energy())
        ),
        format!(
            "channels: {}; {}, ⟨cos²β⟩ = {:.2}",
            channels.join("; "),
            orientation_text(t),
            t.alignment.mean_cos2()
        ),
        method_line(d.approximations),
    ];
    FigureContext {
        title: format!("{} — {what}", t.name),
        details,
        photon_ev: units::au_to_ev(omega),
        odd_orders,
        split_half_cycles: split,
        half_wave_symmetric: half_wave,
        markers,
        half_cycles,
        cutoff: d.cutoff.quantum.or(Some(d.cutoff.classical)),
        ip_reference: reference.ip,
    }
}
