//! Orientation classes: orientations that see the same physics in the molecular frame.
//!
//! Everything the amplitude stage computes for one orientation — the hole propagator, the
//! saddles with structure in the phase, the structure prefactors — depends on the orientation
//! `R` only through the field as seen from the molecule, `Rᵀ E(t)`. For a field linearly
//! polarised along `ê` that is `E(t) Rᵀê`: orientations with the same `Rᵀê` (for `ê = ẑ`, the
//! same `β` and `γ`, any `α`) form one class, computed once in the molecular frame and rotated
//! to the lab for each member (`D_lab = R D_mol`). With `R = R_z(α)R_y(β)R_z(γ)` the row `ẑᵀR`
//! does not involve α at all, so the class keys (the bits of `Rᵀê`) match exactly. Other fields
//! are not symmetric about an axis: each orientation is its own class.

use std::collections::BTreeMap;

use nalgebra::{Matrix3, Vector3};

use crate::orientation::Orientation;

/// Orientations that share `Rᵀê`.
#[derive(Clone, Debug)]
pub(super) struct OrientationClass {
    /// The rotation the class is computed with (its first member's).
    pub rotation: Matrix3<f64>,
    /// Indices of the members in the orientation list, in list order.
    pub members: Vec<usize>,
    /// Sum of the members' weights.
    pub weight: f64,
}

/// Groups `list` into classes (in order of first appearance).
pub(super) fn classes(
    list: &[Orientation],
    linear_axis: Option<Vector3<f64>>,
) -> Vec<OrientationClass> {
    let mut out: Vec<OrientationClass> = Vec::new();
    let mut index: BTreeMap<[u64; 3], usize> = BTreeMap::new();
    for (i, o) in list.iter().enumerate() {
        let key = linear_axis.map(|axis| {
            let v = o.rotation.transpose() * axis;
            // +0.0 and −0.0 are the same direction.
            [v.x + 0.0, v.y + 0.0, v.z + 0.0].map(f64::to_bits)
        });
        let slot = key.and_then(|k| index.get(&k).copied());
        match slot {
            Some(c) => {
                out[c].members.push(i);
                out[c].weight += o.weight;
            }
            None => {
                if let Some(k) = key {
                    index.insert(k, out.len());
                }
                out.push(OrientationClass {
                    rotation: o.rotation,
                    members: vec![i],
                    weight: o.weight,
                });
            }
        }
    }
    out
}
