//! The model a fit compares with data: line yields of a target in a laser at given photon
//! energies, behind one trait so that the detection layer (focal averaging, filters, detector
//! response) can be put in its place.
//!
//! [`SingleMolecule`] is the single-molecule spectrum of [`crate::multichannel`]: the emitted
//! power `Ω⁴|D(Ω)|²` of the orientation-averaged dipole, at each line centre. Its trajectory
//! stage depends on the field, the channels' ionization potentials, which channels the couplings
//! connect (pairs with `U_mn = 0` are not solved), whether the hole needs propagating at all,
//! and the Gaussian shells taken into the saddle phase ([`crate::multichannel::trajectory_stage`]);
//! everything else — coupling strengths, field-free couplings, ionization amplitudes, alignment,
//! orientation grid — enters only the amplitude stage. The stage is therefore cached under a
//! key made of exactly those inputs, and a fit that changes only amplitude-stage values solves
//! the saddle points once per distinct field.

use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};

use super::FitError;
use crate::laser::LaserSpec;
use crate::momentum::GaussianSide;
use crate::multichannel::{
    MultichannelSettings, StructurePlacement, TrajectoryStage, assemble, coupling_components,
    propagation_needed, trajectory_stage,
};
use crate::target::{Target, TargetSpec};

/// Line yields of a model at photon energies (a.u.).
pub trait SpectrumModel: Sync {
    /// The model yields at `energies` for the target and laser documents. A point the model
    /// cannot compute (a failed quantum orbit) is an error naming it.
    fn yields(
        &self,
        target: &TargetSpec,
        laser: &LaserSpec,
        energies: &[f64],
    ) -> Result<Vec<f64>, FitError>;

    /// What the model is, for the outputs.
    fn describe(&self) -> String;
}

/// Largest number of trajectory stages kept.
pub const CACHE_SIZE: usize = 32;

/// The single-molecule spectrum with a cached trajectory stage.
pub struct SingleMolecule {
    /// Settings of the multichannel calculation.
    pub settings: MultichannelSettings,
    cache: Mutex<Vec<(String, Arc<TrajectoryStage>)>>,
    /// Trajectory stages solved so far.
    pub stages_solved: AtomicUsize,
    /// Model evaluations so far.
    pub evaluations: AtomicUsize,
}

impl SingleMolecule {
    /// The default multichannel settings without group delays (a fit of yields needs none).
    pub fn new() -> Self {
        SingleMolecule::with_settings(MultichannelSettings {
            group_delays: crate::multichannel::GroupDelays::Skip,
            ..MultichannelSettings::default()
        })
    }

    /// With explicit settings.
    pub fn with_settings(settings: MultichannelSettings) -> Self {
        SingleMolecule {
            settings,
            cache: Mutex::new(Vec::new()),
            stages_solved: AtomicUsize::new(0),
            evaluations: AtomicUsize::new(0),
        }
    }

    /// The key of everything the trajectory stage depends on (module documentation).
    pub fn stage_key(&self, target: &Target, laser: &LaserSpec, energies: &[f64]) -> String {
        let ips: Vec<u64> = target.channels.iter().map(|c| c.ip.to_bits()).collect();
        let phase_ion = !matches!(
            self.settings.ionization_structure,
            StructurePlacement::Prefactor
        );
        let phase_rec = !matches!(
            self.settings.recombination_structure,
            StructurePlacement::Prefactor
        );
        let shells: Vec<String> = target
            .channels
            .iter()
            .map(|c| {
                format!(
                    "{:?}|{:?}",
                    phase_ion.then(|| GaussianSide::ionization(&c.ionization)),
                    phase_rec.then(|| GaussianSide::recombination(&c.recombination))
                )
            })
            .collect();
        let e: Vec<u64> = energies.iter().map(|x| x.to_bits()).collect();
        format!(
            "{}|{ips:?}|{:?}|{}|{shells:?}|{e:?}",
            serde_json::to_string(laser).unwrap_or_default(),
            coupling_components(target),
            propagation_needed(target)
        )
    }

    fn stage(
        &self,
        target: &Target,
        laser: &LaserSpec,
        field: &crate::field::Field,
        energies: &[f64],
    ) -> Result<Arc<TrajectoryStage>, FitError> {
        let key = self.stage_key(target, laser, energies);
        if let Some((_, s)) = self
            .cache
            .lock()
            .map_err(|_| FitError::Model("stage cache poisoned".into()))?
            .iter()
            .find(|(k, _)| *k == key)
        {
            return Ok(s.clone());
        }
        let s = Arc::new(
            trajectory_stage(field, target, energies, &self.settings)
                .map_err(|e| FitError::Model(format!("trajectory stage: {e}")))?,
        );
        self.stages_solved.fetch_add(1, Ordering::Relaxed);
        let mut cache = self
            .cache
            .lock()
            .map_err(|_| FitError::Model("stage cache poisoned".into()))?;
        if !cache.iter().any(|(k, _)| *k == key) {
            if cache.len() >= CACHE_SIZE {
                cache.remove(0);
            }
            cache.push((key, s.clone()));
        }
        Ok(s)
    }
}

impl Default for SingleMolecule {
    fn default() -> Self {
        SingleMolecule::new()
    }
}

impl SpectrumModel for SingleMolecule {
    fn yields(
        &self,
        target: &TargetSpec,
        laser: &LaserSpec,
        energies: &[f64],
    ) -> Result<Vec<f64>, FitError> {
        self.evaluations.fetch_add(1, Ordering::Relaxed);
        let t = target
            .validate()
            .map_err(|e| FitError::Model(format!("target: {e}")))?;
        let field = laser
            .to_field()
            .map_err(|e| FitError::Model(format!("laser: {e}")))?;
        let stage = self.stage(&t, laser, &field, energies)?;
        let s = assemble(
            &field,
            &t,
            &stage,
            self.settings.linear_fast_path,
            &|_, _| {},
        )
        .map_err(|e| FitError::Model(format!("amplitude stage: {e}")))?;
        let mut out = Vec::with_capacity(energies.len());
        for (k, &energy) in energies.iter().enumerate() {
            if !s.complete[k] {
                return Err(FitError::Model(format!(
                    "the spectrum at {:.4} eV (order {:.3}) is incomplete: a quantum orbit did not \
                     converge ({:?})",
                    crate::units::au_to_ev(energy),
                    energy / s.omega,
                    s.status[k]
                )));
            }
            out.push(s.power(k));
        }
        Ok(out)
    }

    fn describe(&self) -> String {
        "single-molecule emitted power Ω⁴|D(Ω)|² at each line centre (orientation-averaged \
         multichannel saddle-point dipole; no focal-volume averaging, propagation or detector \
         response)"
            .into()
    }
}
