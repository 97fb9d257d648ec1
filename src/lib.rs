//! osculate: intrinsic kinematics of recorded paths.
//!
//! Pure-Rust kernels (no Python types) for the speed, arc length, Frenet frame, curvature, torsion,
//! tangential/normal acceleration split and turn rate of sampled paths, for one or many tracks at
//! once. The Python bindings live in [`bindings`] behind the `python` feature.

pub mod arclength;
pub mod batch;
pub mod diff;
pub mod error;
pub mod frame;
pub mod kinematics;

#[cfg(feature = "python")]
pub mod bindings;

pub use error::{KernelError, Result};
