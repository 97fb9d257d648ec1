//! TEMPORARY compile stub (replaced by the stopsrs branch; never committed).
#![allow(missing_docs, unused_variables)]
#[derive(Debug, Clone, Default, PartialEq)]
pub struct StopRows {
    pub first: Vec<usize>,
    pub last: Vec<usize>,
    pub track: Vec<usize>,
}
pub fn find_stops(
    t: &[f64],
    x: &[f64],
    dim: usize,
    flags: &[u8],
    offsets: &[usize],
    noise: &[f64],
    min_stop: Option<f64>,
) -> crate::error::Result<StopRows> {
    Ok(StopRows::default())
}
pub fn held_mask(stops: &StopRows, n: usize) -> crate::error::Result<Vec<bool>> {
    let mut h = vec![false; n];
    for (a, b) in stops.first.iter().zip(&stops.last) {
        for i in *a..=*b {
            h[i] = true;
        }
    }
    Ok(h)
}
pub fn centres(x: &[f64], dim: usize, stops: &StopRows) -> crate::error::Result<Vec<f64>> {
    Ok(vec![])
}
