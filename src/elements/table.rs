//! The element table: what a batch gives (samples, options) and what it gets back (elements).

use crate::frame::flag;

/// Samples with these flags take no part.
pub const UNUSABLE: u8 = flag::STOPPED | flag::INVALID | flag::GAP;
/// Element kinds.
pub const STRAIGHT: u8 = 0;
pub const ARC: u8 = 1;
pub const SPIRAL: u8 = 2;

/// Per-sample inputs of a batch, kernel row order.
#[derive(Debug, Clone, Copy)]
pub struct Samples<'a> {
    pub t: &'a [f64],
    /// Cumulative arc length.
    pub arclength: &'a [f64],
    /// Signed curvature (left turns positive).
    pub curvature: &'a [f64],
    /// Standard error of the curvature (NaN: unknown).
    pub se: &'a [f64],
    /// Flag bits (see [`crate::frame::flag`]).
    pub flags: &'a [u8],
    /// Positions in the plane, row-major (n, 2).
    pub xy: &'a [f64],
}

/// Options; per-track arrays have one entry per track.
#[derive(Debug, Clone, Copy)]
pub struct Options<'a> {
    /// Penalty per piece in weighted-χ² units; NaN: `3 ln n_eff`.
    pub penalty: f64,
    /// Shortest piece (arc length) per track; NaN: `max(3, 6 · bandwidth)` median spacings
    /// (see [`crate::elements::MIN_LENGTH_BANDWIDTHS`]).
    pub min_length: &'a [f64],
    /// Smoothing bandwidth in samples per track (`fit_info["bandwidth"]`; NaN: none, the
    /// curvatures are taken as independent).
    pub bandwidth: &'a [f64],
    /// Standard errors of level and slope within which they count as zero.
    pub significance: f64,
    /// Relative floor of the curvature's standard error, times the 95th percentile of |κ|.
    pub resolution: f64,
    /// Refine in position space.
    pub refine: bool,
    /// Most Levenberg–Marquardt iterations.
    pub max_iterations: usize,
}

/// One element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Track position in the batch.
    pub track: usize,
    /// [`STRAIGHT`], [`ARC`] or [`SPIRAL`].
    pub kind: u8,
    /// Arc length (of the input's `arclength`) and time at the element's ends, interpolated
    /// from the samples' foot points on the chain.
    pub start_arclength: f64,
    pub end_arclength: f64,
    pub start_time: f64,
    pub end_time: f64,
    /// Length along the chain.
    pub length: f64,
    /// Signed curvature at the ends.
    pub start_curvature: f64,
    pub end_curvature: f64,
    /// 1/|κ| of an arc (NaN otherwise).
    pub radius: f64,
    /// Spiral parameter A, A² = L/|κ₁ − κ₀| (NaN otherwise).
    pub spiral_parameter: f64,
    /// Start point and heading (radians, counter-clockwise from +x).
    pub x: f64,
    pub y: f64,
    pub heading: f64,
    /// RMS and largest distance of the samples on the element from the chain, along its normal.
    pub rms: f64,
    pub max_distance: f64,
    /// Samples whose foot points lie on the element.
    pub samples: usize,
    /// Whether the position-space refinement converged.
    pub refined: bool,
}
