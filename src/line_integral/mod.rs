//! Line integrals along sampled paths: the work ∫ F·dr of a force and the scalar integral ∫ f ds,
//! per track, total or cumulative, with an error estimate from two rules of different order.
//!
//! Three ways to give the integrand:
//!
//! * [`sampled`]: values at the path's samples. The trapezoid rule integrates the linear
//!   interpolants of the force and of the path on each segment, (F₀ + F₁)/2 · (r₁ − r₀); the
//!   cubic rule interpolates both by the cubic through four neighbouring samples (centred on the
//!   segment, one-sided at the ends: P. E. Gill and G. F. Miller, *An algorithm for the
//!   integration of unequally spaced data*, Comput. J. 15 (1972) 80–83) and integrates their
//!   product exactly (3-point Gauss–Legendre quadrature, or the closed form of `sampled.rs`).
//! * [`gridded`]: a [`GridField`](crate::field::GridField) interpolated at Gauss–Legendre nodes on
//!   the straight segments.
//! * [`segment_nodes`] then [`from_values`]: the nodes are handed out (to a Python callable, say),
//!   the values at them come back and are integrated.
//!
//! [`power`] gives F·v at every sample, the rate of the work.
//!
//! Options are checked once, by [`Options::new`]. Rows whose position (or sampled value) is not
//! finite are skipped: the path runs straight from the previous usable row of the track to the
//! next one. Work is cut into jobs of at most [`batch::CHUNK`](crate::batch::CHUNK) rows that
//! run in parallel; cumulative sums are stitched per track afterwards.
//!
//! Files: `options` (kinds, rules, the checked options, the node rule), `driver` (jobs, sums,
//! stitching), `sampled` (trapezoid and cubic rules, the streaming sweep of both; its internal
//! tests in `sampled_tests`), `gridded` (grid fields on straight segments), `nodes` (the
//! callable protocol), `power` (F·v), `tests`.

mod driver;
mod gridded;
mod nodes;
mod options;
mod power;
mod sampled;
#[cfg(test)]
mod tests;

pub use driver::Integral;
pub use gridded::gridded;
pub use nodes::{from_values, segment_nodes, Nodes};
pub use options::{
    check_nodes, Integrand, Kind, NodeRule, Options, Rule, DEFAULT_NODES, FIELD_RULE, MAX_NODES,
};
pub use power::{power, PowerForce};
pub use sampled::sampled;
