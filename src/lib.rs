//! osculate: intrinsic kinematics of recorded paths.
//!
//! Pure-Rust kernels (no Python types) for the speed, arc length, Frenet frame, curvature, torsion,
//! tangential/normal acceleration split and turn rate of sampled paths, for one or many tracks at
//! once. The Python bindings live in [`bindings`] behind the `python` feature.

// Index loops mirror the published recurrences (Fornberg, de Boor, Piegl–Tiller) line by line.
#![allow(clippy::needless_range_loop)]

pub mod arclength;
pub mod banded;
pub mod batch;
pub mod bspline;
pub mod diagnose;
pub mod diff;
pub mod elements;
pub mod error;
pub mod field;
pub mod fit;
pub mod fit_options;
pub mod frame;
pub mod fresnel;
pub mod geodesy;
pub mod grouping;
pub mod kinematics;
pub mod line_integral;
pub mod local;
pub mod piecewise;
pub mod resample;
pub mod rmf;
pub mod smooth;
pub mod spline;
pub mod stops;
pub mod summary;
pub mod turns;
pub mod uncertainty;

#[cfg(feature = "python")]
pub mod bindings;

pub use error::{KernelError, Result};
