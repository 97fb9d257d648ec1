//! The one error type of the kernels.
//!
//! Every variant that concerns the data carries the argument, the track (position of the track in the
//! batch, 0-based) and the row (global 0-based row in the concatenated input) so that the Python layer
//! can point the caller at the exact offending sample.

use thiserror::Error;

/// What went wrong in a kernel.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum KernelError {
    /// Two arrays that must describe the same rows disagree in length or width.
    #[error("{argument}: {detail}")]
    Shape {
        /// Name of the offending argument.
        argument: &'static str,
        /// Human-readable explanation.
        detail: String,
    },
    /// A scalar option is out of its domain.
    #[error("{argument}: {detail}")]
    Option {
        /// Name of the offending option.
        argument: &'static str,
        /// Human-readable explanation.
        detail: String,
    },
    /// The row offsets that split the rows into tracks are malformed.
    #[error("offsets: {detail}")]
    Offsets {
        /// Human-readable explanation.
        detail: String,
    },
    /// An option does not suit one track (window longer than the track, ...).
    #[error("track {track}: {argument}: {detail}")]
    Track {
        /// Name of the offending option or argument.
        argument: &'static str,
        /// Track position in the batch.
        track: usize,
        /// Human-readable explanation.
        detail: String,
    },
    /// A track holds fewer samples than the method needs.
    #[error("track {track} has {have} samples but {method} needs at least {need}")]
    TooShort {
        /// Track position in the batch.
        track: usize,
        /// Samples in the track.
        have: usize,
        /// Samples the method needs.
        need: usize,
        /// Which method asked.
        method: &'static str,
    },
    /// A value in a row breaks a rule (non-finite time, time not increasing, ...).
    #[error("{argument}: track {track}, row {row}: {detail}")]
    Row {
        /// Name of the offending argument.
        argument: &'static str,
        /// Track position in the batch.
        track: usize,
        /// Global row in the concatenated input.
        row: usize,
        /// Human-readable explanation.
        detail: String,
    },
    /// An output buffer could not be allocated.
    #[error("cannot allocate {bytes} bytes (more memory than this process can get)")]
    OutOfMemory {
        /// Size of the failed request.
        bytes: usize,
    },
}

impl KernelError {
    /// Attach a track to an error about an option that only fails for that track.
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::KernelError;
    /// let e = KernelError::Option { argument: "window", detail: "too long".into() }.in_track(3);
    /// assert_eq!((e.argument(), e.track()), ("window", Some(3)));
    /// assert_eq!(e.to_string(), "track 3: window: too long");
    /// ```
    pub fn in_track(self, track: usize) -> Self {
        match self {
            KernelError::Option { argument, detail } | KernelError::Shape { argument, detail } => {
                KernelError::Track {
                    argument,
                    track,
                    detail,
                }
            }
            other => other,
        }
    }

    /// The track named by the error, if any.
    pub fn track(&self) -> Option<usize> {
        match self {
            KernelError::TooShort { track, .. }
            | KernelError::Row { track, .. }
            | KernelError::Track { track, .. } => Some(*track),
            _ => None,
        }
    }

    /// The global row named by the error, if any.
    pub fn row(&self) -> Option<usize> {
        match self {
            KernelError::Row { row, .. } => Some(*row),
            _ => None,
        }
    }

    /// The message without the argument, track and row (which the Python layer re-labels).
    pub fn detail(&self) -> String {
        match self {
            KernelError::Shape { detail, .. }
            | KernelError::Option { detail, .. }
            | KernelError::Offsets { detail }
            | KernelError::Track { detail, .. }
            | KernelError::Row { detail, .. } => detail.clone(),
            KernelError::TooShort {
                have, need, method, ..
            } => format!("has {have} samples but {method} needs at least {need}"),
            KernelError::OutOfMemory { .. } => self.to_string(),
        }
    }

    /// The argument named by the error.
    pub fn argument(&self) -> &'static str {
        match self {
            KernelError::Shape { argument, .. }
            | KernelError::Option { argument, .. }
            | KernelError::Track { argument, .. }
            | KernelError::Row { argument, .. } => argument,
            KernelError::Offsets { .. } => "offsets",
            KernelError::TooShort { .. } => "t",
            KernelError::OutOfMemory { .. } => "",
        }
    }
}

/// Result alias of the kernels.
pub type Result<T> = std::result::Result<T, KernelError>;

/// A vector of `len` copies of `value`, or [`KernelError::OutOfMemory`] instead of an abort.
///
/// # Examples
///
/// ```
/// use osculate::error::try_filled;
/// use osculate::KernelError;
/// assert_eq!(try_filled(3, 1.5).unwrap(), vec![1.5; 3]);
/// // More than the address space: an error, not an abort.
/// let e = try_filled(usize::MAX / 4, 0.0f64).unwrap_err();
/// assert!(matches!(e, KernelError::OutOfMemory { .. }));
/// ```
pub fn try_filled<T: Clone>(len: usize, value: T) -> Result<Vec<T>> {
    let mut v = Vec::new();
    v.try_reserve_exact(len)
        .map_err(|_| KernelError::OutOfMemory {
            bytes: len.saturating_mul(std::mem::size_of::<T>()),
        })?;
    v.resize(len, value);
    Ok(v)
}

/// A vector of `len` zeros taken from zeroed pages (no write pass; the pages are touched by the
/// caller's first write), or [`KernelError::OutOfMemory`] instead of an abort.
pub fn try_zeroed(len: usize) -> Result<Vec<f64>> {
    let oom = || KernelError::OutOfMemory {
        bytes: len.saturating_mul(8),
    };
    if len == 0 {
        return Ok(Vec::new());
    }
    let layout = std::alloc::Layout::array::<f64>(len).map_err(|_| oom())?;
    // SAFETY: the layout has a non-zero size; the all-zero bit pattern is the f64 value 0.0; the
    // pointer comes from the global allocator with exactly the layout `Vec<f64>` uses for a
    // capacity of `len`, so the vector may own and free it.
    unsafe {
        let p = std::alloc::alloc_zeroed(layout) as *mut f64;
        if p.is_null() {
            return Err(oom());
        }
        Ok(Vec::from_raw_parts(p, len, len))
    }
}

/// A copy of `s`, or [`KernelError::OutOfMemory`] instead of an abort.
pub fn try_copy<T: Copy>(s: &[T]) -> Result<Vec<T>> {
    try_collect(s.len(), s.iter().copied())
}

/// Collect an iterator into a vector reserved fallibly for `len` items (an upper bound of what the
/// iterator yields), or [`KernelError::OutOfMemory`] instead of an abort.
///
/// # Examples
///
/// ```
/// use osculate::error::try_collect;
/// let squares = try_collect(4, (1..=4).map(|i| i * i)).unwrap();
/// assert_eq!(squares, vec![1, 4, 9, 16]);
/// assert!(try_collect(usize::MAX, std::iter::empty::<f64>()).is_err());
/// ```
pub fn try_collect<T, I: IntoIterator<Item = T>>(len: usize, items: I) -> Result<Vec<T>> {
    let mut v = Vec::new();
    v.try_reserve_exact(len)
        .map_err(|_| KernelError::OutOfMemory {
            bytes: len.saturating_mul(std::mem::size_of::<T>()),
        })?;
    v.extend(items);
    Ok(v)
}
