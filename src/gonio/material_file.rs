//! A one-material file for `polaray gonio --material-file`: a tiny TOML with
//! the band list and the coefficients per band.
//!
//! ```toml
//! name = "slatted panel"          # optional; the file name otherwise
//! bands_hz = [125, 250, 500, 1000, 2000, 4000]
//! absorption = [0.10, 0.10, 0.08, 0.08, 0.07, 0.07]
//! scattering = [0.05, 0.15, 0.40, 0.60, 0.70, 0.70]
//! diffusion  = [0.12, 0.15, 0.30, 0.45, 0.50, 0.50]   # optional
//! polar = "slatted.polar.toml"    # optional polar data, relative to this file
//! [goniometer]                    # optional: what d was measured with (defaults shown)
//! sample_width_m = 1.5
//! source_distance_m = 10.0
//! receiver_distance_m = 5.0
//! receivers = 37
//! receiver_step_deg = 5.0
//! ```

use std::path::{Path, PathBuf};

use serde::Deserialize;

use crate::bands::{BandSet, Bands};
use crate::room::Material;

/// A material file that cannot be used.
#[derive(Debug, thiserror::Error, PartialEq)]
#[error("{}: {problem}", .file.display())]
pub struct MaterialFileError {
    /// The file.
    pub file: PathBuf,
    /// What is wrong, naming the field (and band) concerned.
    pub problem: String,
}

/// A loaded material with its bands.
#[derive(Clone, Debug)]
pub struct MaterialFile {
    /// The bands of the file.
    pub bands: BandSet,
    /// The material.
    pub material: Material,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct Raw {
    name: Option<String>,
    bands_hz: Vec<u32>,
    absorption: Vec<f64>,
    scattering: Vec<f64>,
    diffusion: Option<Vec<f64>>,
    polar: Option<PathBuf>,
    goniometer: Option<crate::room::file::GoniometerFile>,
}

/// Reads and checks a material file.
pub fn load_material_file(path: &Path) -> Result<MaterialFile, MaterialFileError> {
    let text = std::fs::read_to_string(path).map_err(|e| MaterialFileError {
        file: path.to_path_buf(),
        problem: format!("cannot read the file: {}", crate::messages::io_problem(&e)),
    })?;
    parse_material_file(&text, path)
}

/// Parses material-file text; `path` names the file in messages and gives the
/// default material name.
pub fn parse_material_file(text: &str, path: &Path) -> Result<MaterialFile, MaterialFileError> {
    let fail = |problem: String| MaterialFileError {
        file: path.to_path_buf(),
        problem,
    };
    let raw: Raw = toml::from_str(text).map_err(|e| fail(crate::messages::toml_problem(&e)))?;
    let bands = BandSet::new(&raw.bands_hz).map_err(|e| fail(format!("bands_hz: {e}")))?;
    let coefficients = |field: &str, v: &[f64]| -> Result<Bands, MaterialFileError> {
        let values = bands.values(v).map_err(|e| fail(format!("{field}: {e}")))?;
        for (i, &x) in v.iter().enumerate() {
            if !(x.is_finite() && (0.0..=1.0).contains(&x)) {
                return Err(fail(format!(
                    "{field}: {x} at {} Hz is outside 0..1; give a value from 0 to 1",
                    bands.centres_hz()[i]
                )));
            }
        }
        Ok(values)
    };
    let absorption = coefficients("absorption", &raw.absorption)?;
    let scattering = coefficients("scattering", &raw.scattering)?;
    let diffusion = raw
        .diffusion
        .as_deref()
        .map(|d| coefficients("diffusion", d))
        .transpose()?;
    let name = raw.name.unwrap_or_else(|| {
        path.file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_else(|| "material".into())
    });
    let polar_file = raw.polar.map(|p| match path.parent() {
        Some(dir) if p.is_relative() => dir.join(p),
        _ => p,
    });
    let goniometer = raw.goniometer.as_ref().map(|g| g.resolve());
    if let Some(problem) = goniometer.as_ref().and_then(|g| g.problem()) {
        return Err(fail(format!("goniometer: {problem}")));
    }
    Ok(MaterialFile {
        bands,
        material: Material {
            name,
            absorption,
            scattering,
            diffusion,
            polar_file,
            goniometer,
        },
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_a_file_and_names_bad_fields() {
        let p = Path::new("panel.toml");
        let ok = parse_material_file(
            "bands_hz = [500, 1000]\nabsorption = [0.1, 0.2]\nscattering = [0.3, 0.4]\n",
            p,
        )
        .unwrap();
        assert_eq!(ok.material.name, "panel");
        assert!(ok.material.diffusion.is_none());
        assert!(ok.material.polar_file.is_none());
        let with_polar = parse_material_file(
            "bands_hz = [500]\nabsorption = [0.1]\nscattering = [0.3]\npolar = \"a.polar.toml\"\n",
            Path::new("data/panel.toml"),
        )
        .unwrap();
        assert_eq!(
            with_polar.material.polar_file.as_deref(),
            Some(Path::new("data/a.polar.toml"))
        );
        assert_eq!(ok.material.scattering[1], 0.4);
        let e = parse_material_file(
            "bands_hz = [500, 1000]\nabsorption = [0.1]\nscattering = [0.3, 0.4]\n",
            p,
        )
        .unwrap_err();
        assert!(
            e.to_string().contains("absorption: expected 2 values"),
            "{e}"
        );
        let e = parse_material_file(
            "bands_hz = [500, 1000]\nabsorption = [0.1, 0.2]\nscattering = [0.3, 1.4]\n",
            p,
        )
        .unwrap_err();
        assert!(e.to_string().contains("scattering: 1.4 at 1000 Hz"), "{e}");
        let e = parse_material_file("bands_hz = [500]\nabsorption = [0.1]\n", p).unwrap_err();
        assert!(e.to_string().contains("scattering"), "{e}");
    }
}
