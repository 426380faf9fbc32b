//! The profile specification file (TOML, polaray's own format, see
//! `src/profile/FORMAT.md`): what surface to predict, on which virtual
//! goniometer, in which bands. Reading it checks every value and names the
//! file and field of any problem.

use std::path::{Path, PathBuf};

use serde::Deserialize;

use super::sequence::{is_prime, is_primitive_root, smallest_primitive_root};

/// A parsed and checked profile specification.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ProfileSpec {
    /// Descriptive name of the surface, copied into the polar file.
    pub name: String,
    /// The surface.
    pub profile: ProfileShape,
    /// The virtual goniometer.
    #[serde(default)]
    pub goniometer: GoniometerSpec,
    /// Bands and how each is evaluated.
    #[serde(default)]
    pub bands: BandSpec,
    /// Integration step rule.
    #[serde(default)]
    pub integration: IntegrationSpec,
}

/// The surface shapes polaray can predict. Extruded (1D) shapes vary along x
/// only; grid shapes vary along x and y.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case", deny_unknown_fields)]
pub enum ProfileShape {
    /// A flat rigid panel.
    Flat {
        /// Overall width, m.
        width_m: f64,
    },
    /// A rigid sinusoid z = amplitude · sin(2π x / period + phase).
    Sinusoid {
        /// Overall width, m.
        width_m: f64,
        /// Peak amplitude (half of peak-to-trough), m.
        amplitude_m: f64,
        /// Period along x, m.
        period_m: f64,
        /// Phase at the sample centre, degrees (default 0).
        #[serde(default)]
        phase_deg: f64,
    },
    /// Wells with depths d_n = (n² mod N) λ0 / (2N), n = 0..N−1 (Schroeder).
    QuadraticResidue {
        /// The prime N.
        prime: u32,
        /// Design frequency f0, Hz.
        design_hz: f64,
        /// Well width (aperture), m.
        well_width_m: f64,
        /// Fin thickness between wells, m (0 allowed).
        fin_width_m: f64,
        /// Number of periods side by side.
        periods: u32,
    },
    /// Wells with depths d_n = (g^n mod N) λ0 / (2N), n = 1..N−1.
    PrimitiveRoot {
        /// The prime N.
        prime: u32,
        /// Primitive root g of N (default: the smallest).
        #[serde(default)]
        root: Option<u32>,
        /// Design frequency f0, Hz.
        design_hz: f64,
        /// Well width, m.
        well_width_m: f64,
        /// Fin thickness, m.
        fin_width_m: f64,
        /// Number of periods.
        periods: u32,
    },
    /// Wells of given depths, one period.
    WellDepths {
        /// Depth of each well in one period, m.
        depths_m: Vec<f64>,
        /// Well width, m.
        well_width_m: f64,
        /// Fin thickness, m.
        fin_width_m: f64,
        /// Number of periods.
        periods: u32,
    },
    /// A rigid piecewise-linear profile through (x, z) points, x strictly
    /// increasing; the width is the x extent.
    Points {
        /// The points [x_m, z_m].
        points_m: Vec<[f64; 2]>,
    },
    /// A doubly periodic grid of square wells with given depths (rows along y).
    WellGrid {
        /// Depths, m: one row per y cell, each row one value per x cell.
        depths_m: Vec<Vec<f64>>,
        /// Well (cell aperture) width, m, in x and y.
        well_width_m: f64,
        /// Fin thickness, m.
        fin_width_m: f64,
        /// Periods along x.
        periods_x: u32,
        /// Periods along y.
        periods_y: u32,
    },
    /// A grid of square wells with depths ((n² + m²) mod N) λ0 / (2N).
    QuadraticResidueGrid {
        /// The prime N.
        prime: u32,
        /// Design frequency, Hz.
        design_hz: f64,
        /// Well width, m.
        well_width_m: f64,
        /// Fin thickness, m.
        fin_width_m: f64,
        /// Periods along x.
        periods_x: u32,
        /// Periods along y.
        periods_y: u32,
    },
}

impl ProfileShape {
    /// True for shapes that vary in both x and y (predicted in 3D).
    #[must_use]
    pub fn is_grid(&self) -> bool {
        matches!(
            self,
            Self::WellGrid { .. } | Self::QuadraticResidueGrid { .. }
        )
    }
}

/// Receiver arrangement asked for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ArrangementSpec {
    /// An arc in the plane through the normal (x–z plane).
    Plane,
    /// A (θ, φ) grid over the hemisphere (grid profiles only).
    Hemisphere,
}

/// Virtual goniometer settings. Angles in degrees from the sample normal.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GoniometerSpec {
    /// Source distance from the sample centre, m.
    #[serde(default = "default_source_m")]
    pub source_distance_m: f64,
    /// Receiver distance from the sample centre, m.
    #[serde(default = "default_receiver_m")]
    pub receiver_distance_m: f64,
    /// Source angles, degrees (signed in the plane; ≥ 0 on the hemisphere).
    #[serde(default = "default_incidences")]
    pub incidence_deg: Vec<f64>,
    /// Source azimuth on the hemisphere, degrees.
    #[serde(default)]
    pub incidence_azimuth_deg: f64,
    /// Receiver arrangement (default: plane for extruded profiles,
    /// hemisphere for grids).
    #[serde(default)]
    pub arrangement: Option<ArrangementSpec>,
    /// First receiver angle of the arc, degrees.
    #[serde(default = "default_arc_start")]
    pub receiver_start_deg: f64,
    /// Last receiver angle of the arc, degrees.
    #[serde(default = "default_arc_end")]
    pub receiver_end_deg: f64,
    /// Receiver step, degrees (arc, and polar step on the hemisphere).
    #[serde(default = "default_arc_step")]
    pub receiver_step_deg: f64,
    /// Azimuth step on the hemisphere, degrees (must divide 360).
    #[serde(default = "default_azimuth_step")]
    pub azimuth_step_deg: f64,
    /// Speed of sound, m/s.
    #[serde(default = "default_speed")]
    pub sound_speed_m_s: f64,
}

fn default_source_m() -> f64 {
    10.0
}
fn default_receiver_m() -> f64 {
    5.0
}
fn default_incidences() -> Vec<f64> {
    vec![0.0]
}
fn default_arc_start() -> f64 {
    -90.0
}
fn default_arc_end() -> f64 {
    90.0
}
fn default_arc_step() -> f64 {
    5.0
}
fn default_azimuth_step() -> f64 {
    15.0
}
fn default_speed() -> f64 {
    343.0
}

impl Default for GoniometerSpec {
    fn default() -> Self {
        Self {
            source_distance_m: default_source_m(),
            receiver_distance_m: default_receiver_m(),
            incidence_deg: default_incidences(),
            incidence_azimuth_deg: 0.0,
            arrangement: None,
            receiver_start_deg: default_arc_start(),
            receiver_end_deg: default_arc_end(),
            receiver_step_deg: default_arc_step(),
            azimuth_step_deg: default_azimuth_step(),
            sound_speed_m_s: default_speed(),
        }
    }
}

/// Band width of the bands listed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum BandFraction {
    /// Octave bands.
    Octave,
    /// Third-octave bands.
    Third,
}

impl BandFraction {
    /// Bandwidth in octaves (1 or 1/3).
    #[must_use]
    pub fn octaves(self) -> f64 {
        match self {
            Self::Octave => 1.0,
            Self::Third => 1.0 / 3.0,
        }
    }
}

/// How one band's level is computed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Evaluation {
    /// At the exact band centre frequency only.
    Centre,
    /// Energy average over frequencies spread evenly across the band.
    Average,
}

/// Bands and their evaluation.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BandSpec {
    /// Nominal centre frequencies, Hz (IEC 61260-1 nominal values).
    #[serde(default = "default_centres")]
    pub centres_hz: Vec<f64>,
    /// Octave or third-octave bands.
    #[serde(default = "default_fraction")]
    pub fraction: BandFraction,
    /// Evaluation of every band.
    #[serde(default = "default_evaluation")]
    pub evaluation: Evaluation,
    /// Evaluation per band, overriding `evaluation` (one per band).
    #[serde(default)]
    pub evaluation_per_band: Option<Vec<Evaluation>>,
    /// Frequencies averaged per band in `average` mode.
    #[serde(default = "default_frequencies_per_band")]
    pub frequencies_per_band: u32,
}

fn default_centres() -> Vec<f64> {
    vec![125.0, 250.0, 500.0, 1000.0, 2000.0, 4000.0]
}
fn default_fraction() -> BandFraction {
    BandFraction::Octave
}
fn default_evaluation() -> Evaluation {
    Evaluation::Average
}
fn default_frequencies_per_band() -> u32 {
    7
}

impl Default for BandSpec {
    fn default() -> Self {
        Self {
            centres_hz: default_centres(),
            fraction: default_fraction(),
            evaluation: default_evaluation(),
            evaluation_per_band: None,
            frequencies_per_band: default_frequencies_per_band(),
        }
    }
}

impl BandSpec {
    /// The evaluation of band `i`.
    #[must_use]
    pub fn evaluation_of(&self, i: usize) -> Evaluation {
        self.evaluation_per_band
            .as_ref()
            .and_then(|v| v.get(i).copied())
            .unwrap_or(self.evaluation)
    }
}

/// The integration step rule: surface elements no longer than
/// λ_min / `points_per_wavelength` (λ_min at the highest frequency evaluated),
/// and at least `min_points_per_well` elements across every well and fin.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct IntegrationSpec {
    /// Elements per wavelength at the highest frequency (≥ 6).
    #[serde(default = "default_ppw")]
    pub points_per_wavelength: f64,
    /// Elements across each well and each fin (≥ 1).
    #[serde(default = "default_per_well")]
    pub min_points_per_well: u32,
}

fn default_ppw() -> f64 {
    10.0
}
fn default_per_well() -> u32 {
    4
}

impl Default for IntegrationSpec {
    fn default() -> Self {
        Self {
            points_per_wavelength: default_ppw(),
            min_points_per_well: default_per_well(),
        }
    }
}

/// IEC 61260-1 nominal octave centres accepted, Hz.
pub const NOMINAL_OCTAVE_HZ: [f64; 10] = [
    31.5, 63.0, 125.0, 250.0, 500.0, 1000.0, 2000.0, 4000.0, 8000.0, 16000.0,
];

/// IEC 61260-1 nominal third-octave centres accepted, Hz.
pub const NOMINAL_THIRD_HZ: [f64; 28] = [
    25.0, 31.5, 40.0, 50.0, 63.0, 80.0, 100.0, 125.0, 160.0, 200.0, 250.0, 315.0, 400.0, 500.0,
    630.0, 800.0, 1000.0, 1250.0, 1600.0, 2000.0, 2500.0, 3150.0, 4000.0, 5000.0, 6300.0, 8000.0,
    10000.0, 12500.0,
];

/// A specification that cannot be used.
#[derive(Debug, thiserror::Error)]
pub enum SpecError {
    /// The file could not be read.
    #[error("{}: cannot read the profile file: {}", .file.display(), crate::messages::io_problem(.cause))]
    Read {
        /// The file.
        file: PathBuf,
        /// Why (not a `source`: the message already says it).
        cause: std::io::Error,
    },
    /// TOML syntax or an unknown / missing / mistyped field.
    #[error("{}: {message}", .file.display())]
    Parse {
        /// The file.
        file: PathBuf,
        /// The TOML reader's message (line, column and field).
        message: String,
    },
    /// Values that parse but make no sense.
    #[error("{}: {}", .file.display(), .problems.join("\n  "))]
    Invalid {
        /// The file.
        file: PathBuf,
        /// Every problem, each naming the field.
        problems: Vec<String>,
    },
}

/// Reads and checks a profile specification file.
pub fn load_spec(path: &Path) -> Result<ProfileSpec, SpecError> {
    let text = std::fs::read_to_string(path).map_err(|cause| SpecError::Read {
        file: path.to_path_buf(),
        cause,
    })?;
    parse_spec(&text, path)
}

/// Parses and checks specification text; `path` names it in errors.
pub fn parse_spec(text: &str, path: &Path) -> Result<ProfileSpec, SpecError> {
    let spec: ProfileSpec = toml::from_str(text).map_err(|e| SpecError::Parse {
        file: path.to_path_buf(),
        message: e.to_string().trim_end().to_string(),
    })?;
    let problems = spec.problems();
    if problems.is_empty() {
        Ok(spec)
    } else {
        Err(SpecError::Invalid {
            file: path.to_path_buf(),
            problems,
        })
    }
}

fn positive(problems: &mut Vec<String>, field: &str, v: f64) {
    if !(v.is_finite() && v > 0.0) {
        problems.push(format!("{field} = {v}: must be a positive number"));
    }
}

fn non_negative(problems: &mut Vec<String>, field: &str, v: f64) {
    if !(v.is_finite() && v >= 0.0) {
        problems.push(format!("{field} = {v}: must be zero or positive"));
    }
}

fn count(problems: &mut Vec<String>, field: &str, v: u32) {
    if v == 0 {
        problems.push(format!("{field} = 0: must be at least 1"));
    }
}

fn prime_field(problems: &mut Vec<String>, v: u32) {
    if !is_prime(v) || v < 3 {
        problems.push(format!(
            "profile.prime = {v}: must be an odd prime (3, 5, 7, 11, 13, ...)"
        ));
    }
}

impl ProfileSpec {
    /// Every problem in the values, each naming its field; empty when usable.
    #[must_use]
    pub fn problems(&self) -> Vec<String> {
        let mut p = Vec::new();
        if self.name.trim().is_empty() {
            p.push("name: must not be empty".into());
        }
        self.profile.check(&mut p);
        self.goniometer.check(self.profile.is_grid(), &mut p);
        if p.is_empty() {
            self.check_distances(&mut p);
        }
        self.bands.check(&mut p);
        let i = &self.integration;
        if !(i.points_per_wavelength.is_finite() && i.points_per_wavelength >= 6.0) {
            p.push(format!(
                "integration.points_per_wavelength = {}: must be at least 6 (10 recommended)",
                i.points_per_wavelength
            ));
        }
        count(
            &mut p,
            "integration.min_points_per_well",
            i.min_points_per_well,
        );
        p
    }
}

impl ProfileSpec {
    /// Source and receivers must stay clear of the sample: beyond its half
    /// extent (half width, or half diagonal for grids) and its height.
    fn check_distances(&self, p: &mut Vec<String>) {
        let (w, d) = super::surface::footprint_m(&self.profile);
        let half = 0.5 * w.hypot(d.unwrap_or(0.0));
        let clear = (1.01 * half).max(2.0 * super::surface::max_height_m(&self.profile));
        for (field, r) in [
            (
                "goniometer.source_distance_m",
                self.goniometer.source_distance_m,
            ),
            (
                "goniometer.receiver_distance_m",
                self.goniometer.receiver_distance_m,
            ),
        ] {
            if r <= clear {
                p.push(format!(
                    "{field} = {r}: must exceed {clear:.3} m (just beyond the sample's half extent {half:.3} m and twice its height) so that no position lies on or inside the sample"
                ));
            }
        }
    }
}

impl ProfileShape {
    fn check(&self, p: &mut Vec<String>) {
        match self {
            Self::Flat { width_m } => positive(p, "profile.width_m", *width_m),
            Self::Sinusoid {
                width_m,
                amplitude_m,
                period_m,
                phase_deg,
            } => {
                positive(p, "profile.width_m", *width_m);
                non_negative(p, "profile.amplitude_m", *amplitude_m);
                positive(p, "profile.period_m", *period_m);
                if !phase_deg.is_finite() {
                    p.push("profile.phase_deg: must be a finite number".into());
                }
            }
            Self::QuadraticResidue {
                prime,
                design_hz,
                well_width_m,
                fin_width_m,
                periods,
            } => {
                prime_field(p, *prime);
                positive(p, "profile.design_hz", *design_hz);
                wells_common(p, *well_width_m, *fin_width_m);
                count(p, "profile.periods", *periods);
            }
            Self::PrimitiveRoot {
                prime,
                root,
                design_hz,
                well_width_m,
                fin_width_m,
                periods,
            } => {
                prime_field(p, *prime);
                if let Some(g) = root {
                    if is_prime(*prime) && !is_primitive_root(*g, *prime) {
                        let hint = smallest_primitive_root(*prime)
                            .map(|s| format!(" (the smallest is {s})"))
                            .unwrap_or_default();
                        p.push(format!(
                            "profile.root = {g}: not a primitive root of {prime}{hint}"
                        ));
                    }
                }
                positive(p, "profile.design_hz", *design_hz);
                wells_common(p, *well_width_m, *fin_width_m);
                count(p, "profile.periods", *periods);
            }
            Self::WellDepths {
                depths_m,
                well_width_m,
                fin_width_m,
                periods,
            } => {
                if depths_m.is_empty() {
                    p.push("profile.depths_m: give at least one depth".into());
                }
                for (i, d) in depths_m.iter().enumerate() {
                    non_negative(p, &format!("profile.depths_m[{i}]"), *d);
                }
                wells_common(p, *well_width_m, *fin_width_m);
                count(p, "profile.periods", *periods);
            }
            Self::Points { points_m } => {
                if points_m.len() < 2 {
                    p.push("profile.points_m: give at least two [x, z] points".into());
                }
                for (i, [x, z]) in points_m.iter().enumerate() {
                    if !(x.is_finite() && z.is_finite()) {
                        p.push(format!("profile.points_m[{i}]: coordinates must be finite"));
                    }
                }
                for (i, w) in points_m.windows(2).enumerate() {
                    if w[1][0] <= w[0][0] {
                        p.push(format!(
                            "profile.points_m[{}]: x = {} does not exceed the previous x = {}; x must increase strictly (the profile is a height over x)",
                            i + 1,
                            w[1][0],
                            w[0][0]
                        ));
                    }
                }
            }
            Self::WellGrid {
                depths_m,
                well_width_m,
                fin_width_m,
                periods_x,
                periods_y,
            } => {
                if depths_m.is_empty() || depths_m[0].is_empty() {
                    p.push("profile.depths_m: give at least one row with one depth".into());
                } else {
                    let nx = depths_m[0].len();
                    for (j, row) in depths_m.iter().enumerate() {
                        if row.len() != nx {
                            p.push(format!(
                                "profile.depths_m[{j}]: has {} depths, row 0 has {nx}; all rows must be equally long",
                                row.len()
                            ));
                        }
                        for (i, d) in row.iter().enumerate() {
                            non_negative(p, &format!("profile.depths_m[{j}][{i}]"), *d);
                        }
                    }
                }
                wells_common(p, *well_width_m, *fin_width_m);
                count(p, "profile.periods_x", *periods_x);
                count(p, "profile.periods_y", *periods_y);
            }
            Self::QuadraticResidueGrid {
                prime,
                design_hz,
                well_width_m,
                fin_width_m,
                periods_x,
                periods_y,
            } => {
                prime_field(p, *prime);
                positive(p, "profile.design_hz", *design_hz);
                wells_common(p, *well_width_m, *fin_width_m);
                count(p, "profile.periods_x", *periods_x);
                count(p, "profile.periods_y", *periods_y);
            }
        }
    }
}

fn wells_common(p: &mut Vec<String>, well_width_m: f64, fin_width_m: f64) {
    positive(p, "profile.well_width_m", well_width_m);
    non_negative(p, "profile.fin_width_m", fin_width_m);
}

impl GoniometerSpec {
    /// The arrangement used: the one asked for, else plane for extruded
    /// profiles and hemisphere for grids.
    #[must_use]
    pub fn arrangement_for(&self, grid: bool) -> ArrangementSpec {
        self.arrangement.unwrap_or(if grid {
            ArrangementSpec::Hemisphere
        } else {
            ArrangementSpec::Plane
        })
    }

    fn check(&self, grid: bool, p: &mut Vec<String>) {
        positive(p, "goniometer.source_distance_m", self.source_distance_m);
        positive(
            p,
            "goniometer.receiver_distance_m",
            self.receiver_distance_m,
        );
        positive(p, "goniometer.sound_speed_m_s", self.sound_speed_m_s);
        let arrangement = self.arrangement_for(grid);
        if arrangement == ArrangementSpec::Hemisphere && !grid {
            p.push(
                "goniometer.arrangement = \"hemisphere\": only grid profiles (well_grid, quadratic_residue_grid) are predicted over the hemisphere; use \"plane\" for extruded profiles"
                    .into(),
            );
        }
        if self.incidence_deg.is_empty() {
            p.push("goniometer.incidence_deg: give at least one angle".into());
        }
        for (i, a) in self.incidence_deg.iter().enumerate() {
            let ok = if arrangement == ArrangementSpec::Hemisphere {
                a.is_finite() && (0.0..90.0).contains(a)
            } else {
                a.is_finite() && a.abs() < 90.0
            };
            if !ok {
                let range = if arrangement == ArrangementSpec::Hemisphere {
                    "0 ≤ angle < 90 on the hemisphere (set the side with incidence_azimuth_deg)"
                } else {
                    "−90 < angle < 90"
                };
                p.push(format!(
                    "goniometer.incidence_deg[{i}] = {a}: must lie in {range}"
                ));
            }
        }
        if !self.incidence_azimuth_deg.is_finite() {
            p.push("goniometer.incidence_azimuth_deg: must be finite".into());
        }
        if arrangement == ArrangementSpec::Plane && self.incidence_azimuth_deg != 0.0 {
            p.push(format!(
                "goniometer.incidence_azimuth_deg = {}: the plane arrangement lies in the x–z plane; remove it or use arrangement = \"hemisphere\"",
                self.incidence_azimuth_deg
            ));
        }
        positive(p, "goniometer.receiver_step_deg", self.receiver_step_deg);
        if arrangement == ArrangementSpec::Plane {
            let (a, b) = (self.receiver_start_deg, self.receiver_end_deg);
            if !(a.is_finite() && b.is_finite() && a >= -90.0 && b <= 90.0 && a <= b) {
                p.push(format!(
                    "goniometer.receiver_start_deg = {a}, receiver_end_deg = {b}: need −90 ≤ start ≤ end ≤ 90"
                ));
            }
        } else {
            positive(p, "goniometer.azimuth_step_deg", self.azimuth_step_deg);
            let s = self.receiver_step_deg;
            if s > 0.0 && ((90.0 / s) - (90.0 / s).round()).abs() > 1e-9 {
                p.push(format!(
                    "goniometer.receiver_step_deg = {s}: on the hemisphere it must divide 90"
                ));
            }
            let s = self.azimuth_step_deg;
            if s > 0.0 && ((360.0 / s) - (360.0 / s).round()).abs() > 1e-9 {
                p.push(format!(
                    "goniometer.azimuth_step_deg = {s}: must divide 360"
                ));
            }
        }
    }
}

impl BandSpec {
    fn check(&self, p: &mut Vec<String>) {
        if self.centres_hz.is_empty() {
            p.push("bands.centres_hz: give at least one band".into());
        }
        let (list, what): (&[f64], &str) = match self.fraction {
            BandFraction::Octave => (&NOMINAL_OCTAVE_HZ, "octave"),
            BandFraction::Third => (&NOMINAL_THIRD_HZ, "third-octave"),
        };
        for (i, f) in self.centres_hz.iter().enumerate() {
            if !list.contains(f) {
                p.push(format!(
                    "bands.centres_hz[{i}] = {f}: not a nominal {what} centre (IEC 61260-1), e.g. {}",
                    list.iter()
                        .map(|v| v.to_string())
                        .collect::<Vec<_>>()
                        .join(", ")
                ));
            }
        }
        for w in self.centres_hz.windows(2) {
            if w[1] <= w[0] {
                p.push(format!(
                    "bands.centres_hz: {} follows {}; list the bands in increasing order, once each",
                    w[1], w[0]
                ));
            }
        }
        if let Some(v) = &self.evaluation_per_band {
            if v.len() != self.centres_hz.len() {
                p.push(format!(
                    "bands.evaluation_per_band: {} entries for {} bands; give one per band",
                    v.len(),
                    self.centres_hz.len()
                ));
            }
        }
        if !(1..=64).contains(&self.frequencies_per_band) {
            p.push(format!(
                "bands.frequencies_per_band = {}: must lie in 1..=64 (5 to 9 is usual)",
                self.frequencies_per_band
            ));
        }
    }
}
