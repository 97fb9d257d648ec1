//! Turns the fuzzer's bytes into kernel inputs.
//!
//! Every reader returns a value even when the bytes run out (zeros from then on), so any byte
//! string is a valid input. Values lean towards what stresses numerical kernels: NaN, ±inf, ±0,
//! the largest and smallest normal and subnormal magnitudes, and ordinary small numbers, mixed with
//! raw bit patterns. Times and offsets are usually well-formed (so the fuzzer gets past the input
//! checks into the arithmetic) and sometimes arbitrary (so the checks themselves are exercised).

#![allow(dead_code)]

/// A cursor over the fuzz input.
pub struct Bytes<'a> {
    data: &'a [u8],
    pos: usize,
}

/// Magnitudes and special values that break naive floating-point code.
const SPECIAL: [f64; 16] = [
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    0.0,
    -0.0,
    f64::MAX,
    f64::MIN,
    f64::MIN_POSITIVE,
    -f64::MIN_POSITIVE,
    5e-324, // smallest subnormal
    1e300,
    -1e300,
    1e-300,
    f64::EPSILON,
    1.0,
    -1.0,
];

impl<'a> Bytes<'a> {
    /// A cursor at the start of `data`.
    pub fn new(data: &'a [u8]) -> Self {
        Bytes { data, pos: 0 }
    }

    /// Whether every byte has been consumed.
    pub fn is_empty(&self) -> bool {
        self.pos >= self.data.len()
    }

    /// The next byte, or 0 past the end.
    pub fn u8(&mut self) -> u8 {
        let b = self.data.get(self.pos).copied().unwrap_or(0);
        self.pos += 1;
        b
    }

    /// The next two bytes, little-endian.
    pub fn u16(&mut self) -> u16 {
        u16::from_le_bytes([self.u8(), self.u8()])
    }

    /// The next eight bytes, little-endian.
    pub fn u64(&mut self) -> u64 {
        let mut b = [0u8; 8];
        for v in b.iter_mut() {
            *v = self.u8();
        }
        u64::from_le_bytes(b)
    }

    /// A boolean that is true with probability about `num / 256`.
    pub fn chance(&mut self, num: u8) -> bool {
        self.u8() < num
    }

    /// Any f64: special values, raw bit patterns, or small "ordinary" numbers.
    pub fn f64_any(&mut self) -> f64 {
        let sel = self.u8();
        match sel {
            0..=47 => SPECIAL[(sel % 16) as usize],
            48..=111 => f64::from_bits(self.u64()),
            // A small number with a few significant bits: i / 2^k, i in [-32768, 32767].
            _ => {
                let i = self.u16() as i16 as f64;
                let k = (self.u8() % 24) as i32;
                i / f64::powi(2.0, k)
            }
        }
    }

    /// A finite, non-negative step for building increasing times (may be tiny, huge or zero).
    pub fn step(&mut self) -> f64 {
        let sel = self.u8();
        match sel {
            0..=7 => 0.0,
            8..=15 => 5e-324,
            16..=23 => 1e300,
            24..=31 => f64::MIN_POSITIVE,
            32..=63 => f64::from_bits(self.u64()).abs(),
            _ => 0.5 + (self.u8() as f64) / 64.0, // ordinary: ratios of neighbouring steps <= 9
        }
    }

    /// `n` times: usually strictly increasing from an arbitrary start, sometimes arbitrary.
    pub fn times(&mut self, n: usize) -> Vec<f64> {
        if self.chance(24) {
            return (0..n).map(|_| self.f64_any()).collect();
        }
        let mut t = Vec::with_capacity(n);
        let mut now = if self.chance(128) {
            0.0
        } else {
            self.f64_any()
        };
        for _ in 0..n {
            t.push(now);
            now += self.step();
        }
        t
    }

    /// `len` arbitrary values; with some probability a smooth ramp with a few arbitrary entries,
    /// so that most stencils see finite, ordinary data.
    pub fn values(&mut self, len: usize) -> Vec<f64> {
        if self.chance(128) {
            return (0..len).map(|_| self.f64_any()).collect();
        }
        let a = self.f64_any();
        let b = (self.u8() as f64 - 128.0) / 16.0;
        let mut x: Vec<f64> = (0..len)
            .map(|i| {
                let u = i as f64;
                b * u + 0.01 * u * u * (1.0 + (a.is_finite() as u8 as f64))
            })
            .collect();
        let spikes = self.u8() % 4;
        for _ in 0..spikes {
            if len > 0 {
                let at = self.u16() as usize % len;
                x[at] = self.f64_any();
            }
        }
        x
    }

    /// `m + 1` offsets for `n` rows: usually a valid partition, sometimes arbitrary.
    pub fn offsets(&mut self, n: usize) -> Vec<i64> {
        let mode = self.u8();
        if mode < 16 {
            let len = (self.u8() % 8) as usize;
            return (0..len)
                .map(|_| match self.u8() % 4 {
                    0 => self.u64() as i64,
                    1 => n as i64,
                    2 => 0,
                    _ => (self.u16() % 64) as i64 - 8,
                })
                .collect();
        }
        let mut off = vec![0i64];
        let mut at = 0usize;
        while at < n {
            let len = match self.u8() {
                0..=31 => 1,
                32..=63 => 2 + (self.u8() % 6) as usize,
                _ => n - at,
            };
            at = (at + len.max(1)).min(n);
            off.push(at as i64);
        }
        if n == 0 {
            off.push(0);
        }
        off
    }
}
