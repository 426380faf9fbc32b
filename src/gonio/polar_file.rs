//! A virtual measurement as a polar data file, so `polaray polar` can read it
//! back like a laboratory measurement.

use super::measure::GonioReport;
use crate::polar::{PolarFile, PolarResponse};

/// The report as a [`PolarFile`]: plane arrangement, the goniometer's
/// geometry (the zone follows from it by the image-source rule), one response
/// per band with levels in dB re the total reflected energy.
#[must_use]
pub fn to_polar_file(report: &GonioReport, surface_name: &str) -> PolarFile {
    let origin = match (report.samples, report.seed) {
        (Some(n), Some(seed)) => format!(
            "virtual goniometer (polaray gonio), law '{}', {n} samples, seed {seed}; {}",
            report.law, report.mirror_representation
        ),
        _ => format!(
            "virtual goniometer (polaray gonio), law '{}', {}; {}",
            report.law, report.method, report.mirror_representation
        ),
    };
    PolarFile {
        name: surface_name.to_string(),
        origin,
        geometry: report.geometry.to_polar_geometry(),
        responses: report
            .bands
            .iter()
            .map(|b| PolarResponse {
                band_hz: f64::from(b.band_hz),
                incidence_deg: report.incidence_deg,
                incidence_azimuth_deg: None,
                receiver_deg: report.receiver_deg.clone(),
                receiver_azimuth_deg: None,
                level_db: b.level_db.clone(),
                pressure_re: None,
                pressure_im: None,
                reference_level_db: None,
                reference_re: None,
                reference_im: None,
            })
            .collect(),
    }
}
