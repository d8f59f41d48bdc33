//! Shared helpers for the hole-propagator tests: reading the SciPy reference data and building
//! the models it describes.
#![allow(dead_code)]

use holecast::hole::{FieldSamples, IonModel};
use nalgebra::{DMatrix, Matrix3, Vector3};
use num_complex::Complex64;
use serde::Deserialize;

pub type CMat = Vec<Vec<[f64; 2]>>;

#[derive(Deserialize)]
pub struct Reference {
    pub script: String,
    pub libraries: Libraries,
    pub static_cases: Vec<StaticCase>,
    pub two_colour: DrivenCase,
    pub worst_case: DrivenCase,
    pub rabi: Rabi,
}

#[derive(Deserialize)]
pub struct Libraries {
    pub scipy: String,
    pub numpy: String,
}

#[derive(Deserialize)]
pub struct StaticCase {
    pub name: String,
    pub energies: Vec<f64>,
    pub coupling: CMat,
    pub dipole: [CMat; 3],
    pub euler_zyz: [f64; 3],
    pub field_lab: [f64; 3],
    pub times: Vec<f64>,
    pub schrodinger: Vec<CMat>,
}

#[derive(Deserialize)]
pub struct FieldParams {
    pub w: f64,
    #[serde(rename = "F1")]
    pub f1: f64,
    #[serde(rename = "F2")]
    pub f2: f64,
    pub phase: f64,
}

#[derive(Deserialize)]
pub struct Pair {
    pub t2: f64,
    pub t1: f64,
    pub u_interaction: CMat,
}

#[derive(Deserialize)]
pub struct DrivenCase {
    pub name: String,
    pub energies: Vec<f64>,
    pub coupling: CMat,
    pub dipole: [CMat; 3],
    pub euler_zyz: [f64; 3],
    pub rotation: [[f64; 3]; 3],
    pub field: FieldParams,
    pub window: [f64; 2],
    pub integration_error_estimate: f64,
    pub pairs: Vec<Pair>,
}

#[derive(Deserialize)]
pub struct Rabi {
    pub energies: Vec<f64>,
    pub w: f64,
    #[serde(rename = "F")]
    pub f: f64,
    pub times: Vec<f64>,
    pub population_2: Vec<f64>,
}

pub fn reference() -> Reference {
    let text = include_str!("../data/hole_reference.json");
    serde_json::from_str(text).expect("tests/data/hole_reference.json parses")
}

pub fn cmat(v: &CMat) -> DMatrix<Complex64> {
    let n = v.len();
    DMatrix::from_fn(n, v[0].len(), |i, j| Complex64::new(v[i][j][0], v[i][j][1]))
}

/// Active ZYZ rotation R = Rz(α) Ry(β) Rz(γ), molecular → lab (same formula as the script).
pub fn euler_zyz(a: f64, b: f64, g: f64) -> Matrix3<f64> {
    let rz = |x: f64| Matrix3::new(x.cos(), -x.sin(), 0.0, x.sin(), x.cos(), 0.0, 0.0, 0.0, 1.0);
    let ry = |x: f64| Matrix3::new(x.cos(), 0.0, x.sin(), 0.0, 1.0, 0.0, -x.sin(), 0.0, x.cos());
    rz(a) * ry(b) * rz(g)
}

impl DrivenCase {
    pub fn ion(&self) -> IonModel {
        IonModel::new(
            self.energies.clone(),
            cmat(&self.coupling),
            [
                cmat(&self.dipole[0]),
                cmat(&self.dipole[1]),
                cmat(&self.dipole[2]),
            ],
        )
        .expect("reference ion is valid")
    }
    pub fn rotation(&self) -> Matrix3<f64> {
        euler_zyz(self.euler_zyz[0], self.euler_zyz[1], self.euler_zyz[2])
    }
    pub fn field(&self) -> impl Fn(f64) -> Vector3<f64> + use<> {
        let p = FieldParams { ..self.field };
        move |t| {
            Vector3::new(
                p.f2 * (2.0 * p.w * t + p.phase).cos(),
                0.0,
                p.f1 * (p.w * t).cos(),
            )
        }
    }
    pub fn samples(&self, max_step: f64) -> FieldSamples {
        FieldSamples::new(&self.field(), self.window[0], self.window[1], max_step)
            .expect("valid window")
    }
}

pub fn max_abs_diff(a: &DMatrix<Complex64>, b: &DMatrix<Complex64>) -> f64 {
    (a - b).iter().fold(0.0, |m, z| m.max(z.norm()))
}

pub fn unitarity_defect(u: &DMatrix<Complex64>) -> f64 {
    let n = u.nrows();
    max_abs_diff(&(u * u.adjoint()), &DMatrix::identity(n, n))
}
