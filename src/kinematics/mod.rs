//! Per-sample kinematics of ragged batches of tracks: the derivatives r′, r″, r‴ of every sample
//! (by finite differences, or from a fitted path) → Frenet apparatus → the outputs asked for, in
//! one fused pass with no temporaries per sample.
//!
//! * [`fd`]: finite differences on the samples ([`kinematics`]).
//! * [`fitted`]: at the samples of fitted paths, or at any time ([`of_fits`], [`of_fits_at`]).
//! * `emit`: one sample's derivatives → every requested column, flags and standard errors.

mod emit;
pub mod fd;
pub mod fitted;
pub mod pipeline;

pub use fd::{kinematics, kinematics_in};
pub use fitted::{of_fits, of_fits_at, of_fits_in};

use crate::batch::{partition, SplitRows};
use crate::diff::FdOrder;
use crate::error::{try_filled, try_zeroed, KernelError, Result};
use crate::frame::{flag, Thresholds};
use crate::grouping::{gather_rows, take_rows};
use crate::uncertainty::Significance;
use nalgebra::Vector3;
use rayon::prelude::*;

/// Options of [`kinematics`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Finite-difference order.
    pub order: FdOrder,
    /// When the frame is undefined.
    pub thresholds: Thresholds,
    /// A time step longer than `gap_factor` × the track's median step is a gap.
    pub gap_factor: f64,
    /// Axis of the signed curvature for 3-D paths (planar paths always use +z).
    pub up: Option<[f64; 3]>,
    /// Write the standard errors (finite differences compute them also when `significance`
    /// needs them; fitted tracks have them when their fit kept the covariance).
    pub uncertainty: bool,
    /// Flags judged against the standard errors.
    pub significance: Significance,
    /// The columns written (flags always are).
    pub outputs: Outputs,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            order: FdOrder::Two,
            thresholds: Thresholds::default(),
            gap_factor: 5.0,
            up: None,
            uncertainty: false,
            significance: Significance::default(),
            outputs: Outputs::ALL,
        }
    }
}

/// Which per-sample columns a kinematics kernel writes: a set of the names in [`Outputs::NAMES`].
///
/// Every quantity of a sample comes from the same derivatives in one pass, so asking for fewer
/// saves the writing (the memory traffic, most of the cost) rather than arithmetic. A standard
/// error column is written with its quantity when standard errors are asked for.
///
/// # Examples
///
/// ```
/// use osculate::kinematics::Outputs;
/// let o = Outputs::from_names(["speed", "curvature"]).unwrap();
/// assert!(o.has("speed") && !o.has("torsion"));
/// assert!(Outputs::from_names(["sped"]).is_err());
/// assert!(Outputs::ALL.has("center") && !Outputs::ALL.has("position"));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Outputs(u32);

impl Outputs {
    /// Column names, in bit order. `position_se` is the standard error of the position;
    /// `position` is the position the derivatives belong to (the fitted one for fitted paths),
    /// not in [`Outputs::ALL`].
    pub const NAMES: [&'static str; 19] = [
        "velocity",
        "acceleration",
        "jerk",
        "speed",
        "arclength",
        "tangent",
        "normal",
        "binormal",
        "curvature",
        "signed_curvature",
        "torsion",
        "radius",
        "center",
        "accel_tangential",
        "accel_normal",
        "angular_speed",
        "angular_accel",
        "position_se",
        "position",
    ];
    /// Every quantity (all names but `position`).
    pub const ALL: Outputs = Outputs((1 << 18) - 1);

    fn bit(name: &str) -> Option<u32> {
        Self::NAMES
            .iter()
            .position(|n| *n == name)
            .map(|i| 1u32 << i)
    }

    /// The set of the given names; an unknown name is an error naming the argument `outputs`.
    pub fn from_names<'a>(names: impl IntoIterator<Item = &'a str>) -> Result<Self> {
        let mut bits = 0;
        for name in names {
            bits |= Self::bit(name).ok_or_else(|| KernelError::Option {
                argument: "outputs",
                detail: format!(
                    "unknown output {name:?}; expected some of {}",
                    Self::NAMES.join(", ")
                ),
            })?;
        }
        Ok(Outputs(bits))
    }

    /// Whether `name` is in the set.
    pub fn has(self, name: &str) -> bool {
        Self::bit(name).is_some_and(|b| self.0 & b != 0)
    }

    /// Whether a column asked for needs r‴ (jerk, torsion, dω/dt).
    pub fn needs_third(self) -> bool {
        self.any(&["jerk", "torsion", "angular_accel"])
    }

    fn any(self, names: &[&str]) -> bool {
        names.iter().any(|n| self.has(n))
    }
}

macro_rules! width {
    (dim, $d:expr, $s:expr) => {
        $d
    };
    (three, $d:expr, $s:expr) => {
        3
    };
    (one, $d:expr, $s:expr) => {
        1
    };
    (se, $d:expr, $s:expr) => {
        $s
    };
}

/// One output column: allocated by the kernel, or a caller's buffer written in place.
#[derive(Debug, PartialEq)]
pub enum Col<'a> {
    /// The kernel's own vector.
    Owned(Vec<f64>),
    /// A buffer the caller lent for this call.
    Lent(&'a mut [f64]),
}

impl std::ops::Deref for Col<'_> {
    type Target = [f64];
    fn deref(&self) -> &[f64] {
        match self {
            Col::Owned(v) => v,
            Col::Lent(s) => s,
        }
    }
}

impl std::ops::DerefMut for Col<'_> {
    fn deref_mut(&mut self) -> &mut [f64] {
        match self {
            Col::Owned(v) => v,
            Col::Lent(s) => s,
        }
    }
}

impl Col<'_> {
    /// Replace the values by `v` (copied into a lent buffer, which keeps its place).
    pub fn set(&mut self, v: Vec<f64>) {
        match self {
            Col::Owned(o) => *o = v,
            Col::Lent(s) => s.copy_from_slice(&v),
        }
    }

    /// The kernel's vector (`None` for a lent buffer: the caller has the values already).
    pub fn into_vec(self) -> Option<Vec<f64>> {
        match self {
            Col::Owned(v) => Some(v),
            Col::Lent(_) => None,
        }
    }
}

/// Buffers a caller lends for some output columns (by field name of [`Kinematics`], e.g.
/// `"speed"`, `"tangent"`), written in place instead of allocating: a caller who loops reuses
/// memory that is already mapped (fresh output pages cost the operating system a fault each).
#[derive(Debug, Default)]
pub struct Lend<'a> {
    cols: Vec<(&'static str, &'a mut [f64])>,
}

impl<'a> Lend<'a> {
    /// Lend `buf` for column `name`.
    pub fn lend(&mut self, name: &'static str, buf: &'a mut [f64]) {
        self.cols.push((name, buf));
    }

    fn take(&mut self, name: &str) -> Option<&'a mut [f64]> {
        let i = self.cols.iter().position(|(n, _)| *n == name)?;
        Some(self.cols.swap_remove(i).1)
    }

    /// Whether no buffer is lent.
    pub fn is_empty(&self) -> bool {
        self.cols.is_empty()
    }
}

/// A column of `len` values: a lent buffer (filled with `fill` unless `None`) or a new vector.
fn column<'a>(
    lend: &mut Lend<'a>,
    name: &'static str,
    len: usize,
    fill: Option<f64>,
) -> Result<Col<'a>> {
    match lend.take(name) {
        Some(buf) if len > 0 => {
            if buf.len() != len {
                return Err(KernelError::Shape {
                    argument: "out",
                    detail: format!("{name}: has {} values, expected {len}", buf.len()),
                });
            }
            if let Some(v) = fill {
                buf.fill(v);
            }
            Ok(Col::Lent(buf))
        }
        _ => Ok(Col::Owned(match fill {
            Some(v) => try_filled(len, v)?,
            None => try_zeroed(len)?,
        })),
    }
}

macro_rules! columns {
    ($($(#[$doc:meta])* $name:ident : $w:ident [$($q:literal),+]),* $(,)?) => {
        /// Kinematics of every row, row-major; vectors have the path's dimension `dim` except the
        /// binormal, which is always 3-D (for planar paths it is (0, 0, ±1)).
        #[derive(Debug, PartialEq)]
        pub struct Kinematics<'a> {
            /// Rows.
            pub n: usize,
            /// 2 or 3.
            pub dim: usize,
            /// 1 when the standard-error columns (`se_…`) are present, else 0 (they are empty).
            pub se_w: usize,
            $($(#[$doc])* pub $name: Col<'a>,)*
            /// Bit flags per row, see [`crate::frame::flag`].
            pub flags: Vec<u8>,
            /// Noise standard deviation per track (position units; NaN where not estimated).
            pub noise: Vec<f64>,
        }

        /// Mutable view of some consecutive rows of a [`Kinematics`].
        pub struct Rows<'a> {
            dim: usize,
            se_w: usize,
            $($name: &'a mut [f64],)*
            flags: &'a mut [u8],
        }

        impl<'a> Kinematics<'a> {
            /// Outputs for `n` rows, filled with NaN; standard-error columns when `se`. Columns
            /// not in `want` are empty.
            pub fn alloc(n: usize, dim: usize, se: bool, want: Outputs) -> Result<Self> {
                Self::alloc_in(n, dim, se, want, &mut Lend::default(), Some(f64::NAN))
            }

            /// Outputs for `n` rows in the buffers of `lend` where it has one for the column,
            /// new vectors elsewhere; every value set to `fill` (left as it is with `None`:
            /// every row must then be written).
            pub(crate) fn alloc_in(
                n: usize,
                dim: usize,
                se: bool,
                want: Outputs,
                lend: &mut Lend<'a>,
                fill: Option<f64>,
            ) -> Result<Self> {
                let s = usize::from(se);
                Ok(Kinematics {
                    n,
                    dim,
                    se_w: s,
                    $($name: column(
                        lend,
                        stringify!($name),
                        n * width!($w, dim, s) * usize::from(want.any(&[$($q),+])),
                        fill,
                    )?,)*
                    flags: try_filled(n, 0u8)?,
                    noise: Vec::new(),
                })
            }

            /// Give back the lent buffers (to lend them to another estimate).
            pub(crate) fn into_lend(self) -> Lend<'a> {
                let mut lend = Lend::default();
                $(
                    if let Col::Lent(buf) = self.$name {
                        lend.lend(stringify!($name), buf);
                    }
                )*
                lend
            }

            /// Put the rows in the order `index` (row i becomes row `index[i]` of `self`), one
            /// column at a time so only one extra column is held: the caller's row order from
            /// the kernels'. Columns `lend` has buffers for are written into them. `index` must
            /// be a permutation of the rows (checked by the gather).
            pub fn into_rows(mut self, index: &[usize], lend: &mut Lend<'a>) -> Result<Self> {
                let (d, s) = (self.dim, self.se_w);
                $(
                    if !self.$name.is_empty() {
                        let w = width!($w, d, s);
                        self.$name = match lend.take(stringify!($name)) {
                            Some(buf) if buf.len() == index.len() * w => {
                                gather_rows(&self.$name, w, index, buf)?;
                                Col::Lent(buf)
                            }
                            Some(buf) => {
                                return Err(KernelError::Shape {
                                    argument: "out",
                                    detail: format!(
                                        "{}: has {} values, expected {}",
                                        stringify!($name),
                                        buf.len(),
                                        index.len() * w
                                    ),
                                })
                            }
                            None => Col::Owned(take_rows(&self.$name, w, index)?),
                        };
                    }
                )*
                self.flags = take_rows(&self.flags, 1, index)?;
                self.n = index.len();
                Ok(self)
            }

            /// Whether column `name` (a field name) was written.
            pub fn has(&self, name: &str) -> bool {
                match name {
                    $(stringify!($name) => !self.$name.is_empty(),)*
                    _ => false,
                }
            }

            fn rows(&mut self) -> Rows<'_> {
                Rows {
                    dim: self.dim,
                    se_w: self.se_w,
                    $($name: &mut self.$name[..],)*
                    flags: &mut self.flags[..],
                }
            }
        }

        impl Rows<'_> {
            /// Set every value of local row `j` to NaN.
            fn fill_nan(&mut self, j: usize) {
                let (d, s) = (self.dim, self.se_w);
                $(
                    let w = width!($w, d, s) * usize::from(!self.$name.is_empty());
                    self.$name[j * w..(j + 1) * w].fill(f64::NAN);
                )*
            }

            /// Copy row `src_row` of `src` into local row `dst_row`.
            fn copy_row(&mut self, dst_row: usize, src: &Kinematics<'_>, src_row: usize) {
                let (d, s) = (self.dim, self.se_w);
                $(
                    let w = width!($w, d, s) * usize::from(!self.$name.is_empty());
                    self.$name[dst_row * w..(dst_row + 1) * w]
                        .copy_from_slice(&src.$name[src_row * w..(src_row + 1) * w]);
                )*
                self.flags[dst_row] = src.flags[src_row];
            }
        }

        impl SplitRows for Rows<'_> {
            fn split_rows(self, k: usize) -> (Self, Self) {
                let (d, s) = (self.dim, self.se_w);
                $(
                    let w = width!($w, d, s) * usize::from(!self.$name.is_empty());
                    let $name = self.$name.split_at_mut(k * w);
                )*
                let flags = self.flags.split_at_mut(k);
                (
                    Rows { dim: d, se_w: s, $($name: $name.0,)* flags: flags.0 },
                    Rows { dim: d, se_w: s, $($name: $name.1,)* flags: flags.1 },
                )
            }
        }
    };
}

columns! {
    /// r′.
    velocity: dim ["velocity"],
    /// r″.
    acceleration: dim ["acceleration"],
    /// r‴.
    jerk: dim ["jerk"],
    /// |r′|.
    speed: one ["speed"],
    /// Cumulative polyline length from the track's first finite row.
    arclength: one ["arclength"],
    /// T.
    tangent: dim ["tangent"],
    /// N.
    normal: dim ["normal"],
    /// B (always 3 wide).
    binormal: three ["binormal"],
    /// κ.
    curvature: one ["curvature"],
    /// κ signed about the up axis (NaN for 3-D paths without one).
    signed_curvature: one ["signed_curvature"],
    /// τ.
    torsion: one ["torsion"],
    /// ρ = 1/κ.
    radius: one ["radius"],
    /// Centre of the osculating circle r + ρN.
    center: dim ["center"],
    /// a_t.
    accel_tangential: one ["accel_tangential"],
    /// a_n = κv².
    accel_normal: one ["accel_normal"],
    /// ω = κv.
    angular_speed: one ["angular_speed"],
    /// dω/dt.
    angular_accel: one ["angular_accel"],
    /// The position the derivatives belong to (the fitted one for fitted paths).
    position: dim ["position"],
    /// Standard error of each coordinate of the (fitted) position.
    se_position: se ["position_se"],
    /// Standard error of each coordinate of r′.
    se_velocity: se ["velocity"],
    /// Standard error of each coordinate of r″.
    se_acceleration: se ["acceleration"],
    /// Standard error of each coordinate of r‴.
    se_jerk: se ["jerk"],
    /// Standard error of the speed.
    se_speed: se ["speed"],
    /// Standard error of a_t.
    se_accel_tangential: se ["accel_tangential"],
    /// Standard error of a_n.
    se_accel_normal: se ["accel_normal"],
    /// Standard error of κ (and of the signed curvature).
    se_curvature: se ["curvature", "signed_curvature"],
    /// Standard error of τ.
    se_torsion: se ["torsion"],
    /// Standard error of ω.
    se_angular_speed: se ["angular_speed"],
    /// Standard error of ρ (NaN where κ = 0).
    se_radius: se ["radius"],
}

pub(crate) fn check_options(opts: &Options) -> Result<Option<Vector3<f64>>> {
    let th = &opts.thresholds;
    let bad = |argument, value: f64| KernelError::Option {
        argument,
        detail: format!("must be finite and >= 0, got {value}"),
    };
    if th.min_speed.is_nan() || th.min_speed < 0.0 || th.min_speed.is_infinite() {
        return Err(bad("min_speed", th.min_speed));
    }
    if th.min_curvature.is_nan() || th.min_curvature < 0.0 || th.min_curvature.is_infinite() {
        return Err(bad("min_curvature", th.min_curvature));
    }
    let sig = &opts.significance;
    if !(sig.z > 0.0 && sig.z.is_finite()) {
        return Err(KernelError::Option {
            argument: "significance",
            detail: format!("must be finite and > 0, got {}", sig.z),
        });
    }
    if sig.max_relative.is_nan() || sig.max_relative <= 0.0 {
        return Err(KernelError::Option {
            argument: "max_relative_se",
            detail: format!("must be > 0, got {}", sig.max_relative),
        });
    }
    if opts.gap_factor.is_nan() || opts.gap_factor <= 1.0 {
        return Err(KernelError::Option {
            argument: "gap_factor",
            detail: format!(
                "must be > 1 (or infinite to disable), got {}",
                opts.gap_factor
            ),
        });
    }
    match opts.up {
        None => Ok(None),
        Some(u) => {
            // Scale by the largest component first: a direction may be given with huge numbers.
            let big = u.iter().fold(0.0f64, |a, v| a.max(v.abs()));
            let u = if big > 0.0 && big.is_finite() {
                Vector3::from(u) / big
            } else {
                Vector3::from(u)
            };
            let norm = u.norm();
            if norm.is_nan() || norm == 0.0 || norm.is_infinite() {
                return Err(KernelError::Option {
                    argument: "up",
                    detail: format!("must be a finite non-zero vector, got {u:?}"),
                });
            }
            Ok(Some(u / norm))
        }
    }
}

/// Turn per-row segment lengths into cumulative lengths per track (NaN rows stay NaN).
pub(crate) fn accumulate_arclength(s: &mut [f64], offsets: &[usize]) {
    let m = offsets.len() - 1;
    partition(s, (0..m).map(|k| offsets[k + 1] - offsets[k]))
        .into_par_iter()
        .for_each(|seg| {
            let mut acc = 0.0;
            for v in seg.iter_mut().filter(|v| !v.is_nan()) {
                acc += *v;
                *v = acc;
            }
        });
}

impl Kinematics<'_> {
    /// Make rows `rows` stand still: velocity, acceleration, jerk, speed, a_t and a_n 0; the
    /// frame, κ, τ, ρ, the centre, ω and dω/dt NaN (undefined); every standard error but the
    /// position's NaN (set, not estimated); STOPPED, and not STRAIGHT or VAGUE.
    pub fn hold_rows(&mut self, rows: &[usize]) {
        let (d, s) = (self.dim, self.se_w);
        let set = |col: &mut Col<'_>, w: usize, v: f64| {
            if !col.is_empty() {
                for &r in rows {
                    col[r * w..(r + 1) * w].fill(v);
                }
            }
        };
        for (col, w) in [
            (&mut self.velocity, d),
            (&mut self.acceleration, d),
            (&mut self.jerk, d),
            (&mut self.speed, 1),
            (&mut self.accel_tangential, 1),
            (&mut self.accel_normal, 1),
        ] {
            set(col, w, 0.0);
        }
        for (col, w) in [
            (&mut self.tangent, d),
            (&mut self.normal, d),
            (&mut self.binormal, 3),
            (&mut self.curvature, 1),
            (&mut self.signed_curvature, 1),
            (&mut self.torsion, 1),
            (&mut self.radius, 1),
            (&mut self.center, d),
            (&mut self.angular_speed, 1),
            (&mut self.angular_accel, 1),
            (&mut self.se_velocity, s),
            (&mut self.se_acceleration, s),
            (&mut self.se_jerk, s),
            (&mut self.se_speed, s),
            (&mut self.se_accel_tangential, s),
            (&mut self.se_accel_normal, s),
            (&mut self.se_curvature, s),
            (&mut self.se_torsion, s),
            (&mut self.se_angular_speed, s),
            (&mut self.se_radius, s),
        ] {
            set(col, w, f64::NAN);
        }
        for &r in rows {
            self.flags[r] = (self.flags[r] | flag::STOPPED) & !(flag::STRAIGHT | flag::VAGUE);
        }
    }
}

impl Outputs {
    /// The set with `names` (from [`Outputs::NAMES`]) added; unknown names are ignored.
    pub fn with(self, names: &[&str]) -> Outputs {
        Outputs(
            self.0
                | names
                    .iter()
                    .filter_map(|n| Self::bit(n))
                    .fold(0, |a, b| a | b),
        )
    }
}
