//! PyO3 bindings: borrow NumPy arrays, release the interpreter, call a kernel, wrap the result.
//! Nothing numerical happens here.

mod elements;
mod error;
mod fit;
mod geodesy;
mod grouping;
mod kinematics;
mod line_integral;
mod stops;
mod summary;
mod turns;

use pyo3::prelude::*;

pub use error::InputError;

/// The one registration point of the `osculate._core` extension module.
#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    m.add(
        "KINEMATICS_OUTPUTS",
        crate::kinematics::Outputs::NAMES.to_vec(),
    )?;
    m.add("InputError", m.py().get_type::<InputError>())?;
    m.add_function(wrap_pyfunction!(grouping::group_rows, m)?)?;
    m.add_function(wrap_pyfunction!(grouping::take_rows, m)?)?;
    m.add_function(wrap_pyfunction!(kinematics::kinematics_call, m)?)?;
    m.add_function(wrap_pyfunction!(kinematics::polyline_arclength, m)?)?;
    m.add_function(wrap_pyfunction!(summary::summarize, m)?)?;
    m.add_function(wrap_pyfunction!(stops::find_stops, m)?)?;
    m.add_function(wrap_pyfunction!(elements::find_elements, m)?)?;
    m.add_function(wrap_pyfunction!(elements::fresnel, m)?)?;
    m.add_function(wrap_pyfunction!(turns::find_turns, m)?)?;
    m.add_function(wrap_pyfunction!(turns::find_speed_changes, m)?)?;
    m.add_function(wrap_pyfunction!(fit::fit_paths, m)?)?;
    m.add_function(wrap_pyfunction!(fit::check_estimator_options, m)?)?;
    m.add("ESTIMATOR_METHODS", crate::fit_options::METHODS)?;
    m.add_class::<fit::FittedPaths>()?;
    m.add_function(wrap_pyfunction!(geodesy::geodetic_to_enu, m)?)?;
    m.add_function(wrap_pyfunction!(geodesy::enu_to_geodetic, m)?)?;
    m.add_function(wrap_pyfunction!(line_integral::line_integral_sampled, m)?)?;
    m.add_function(wrap_pyfunction!(line_integral::line_integral_grid, m)?)?;
    m.add_function(wrap_pyfunction!(line_integral::segment_nodes, m)?)?;
    m.add_function(wrap_pyfunction!(line_integral::line_integral_values, m)?)?;
    m.add_function(wrap_pyfunction!(line_integral::grid_eval, m)?)?;
    m.add_function(wrap_pyfunction!(line_integral::line_power, m)?)?;
    Ok(())
}
