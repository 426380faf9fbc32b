//! Choosing a reflection law by name and building the instances a room needs.
//!
//! The tracer only sees a [`RoomLaws`]: boxed laws plus, per surface, which
//! law instance and which local frame to use. Adding a law means adding a
//! [`LawKind`] variant, its name in [`LawKind::NAME_LIST`], one arm in
//! [`LawKind::build`] and its key in [`LawKind::band_groups`]; the tracer loop
//! does not change.

use std::collections::HashMap;
use std::fmt;
use std::str::FromStr;

use super::single_band::{single_band_inputs, SingleBand};
use super::{
    BoundedLaw, BoundedLawError, CalibrationArc, MeasuredPolarLaw, ReflectionLaw, SplitLaw,
};
use crate::bands::BandSet;
use crate::gonio::ArcGeometry;
use crate::polar::load_polar_file;
use crate::room::{Material, Room};

/// The reflection laws polaray can trace with.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum LawKind {
    /// Lambert split by the scattering coefficient ([`SplitLaw`]).
    Split,
    /// Scattered energy shaped to reproduce both the scattering and the
    /// diffusion coefficient ([`BoundedLaw`]); materials give `diffusion`.
    Bounded,
    /// Directions drawn from measured or predicted polar responses
    /// ([`MeasuredPolarLaw`]); materials name a polar file.
    Polar,
}

/// A law that cannot be chosen or built.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum LawError {
    /// The name is not a known law.
    #[error("unknown reflection law `{0}`; choose one of: {list}", list = LawKind::NAME_LIST.join(", "))]
    Unknown(String),
    /// The material lacks data the law needs.
    #[error("material `{material}`: the `{law}` law needs {missing} (or run with `--fallback split` to trace such materials with the split law)")]
    MissingData {
        /// Material name.
        material: String,
        /// Law name.
        law: &'static str,
        /// What to add to the room file.
        missing: String,
    },
    /// The material's data are unusable for the law.
    #[error("material `{material}`: the `{law}` law cannot use its data: {reason}")]
    BadData {
        /// Material name.
        material: String,
        /// Law name.
        law: &'static str,
        /// What is wrong, naming the file where there is one.
        reason: String,
    },
}

/// The law instances of one room for one group of bands.
pub struct RoomLaws {
    /// Law instances.
    pub laws: Vec<Box<dyn ReflectionLaw>>,
    /// Index into `laws` per surface of the room.
    pub surface_law: Vec<u32>,
    /// Materials traced with the fallback law instead, with the reason.
    pub fallbacks: Vec<String>,
    /// Warnings from building the laws (e.g. incidences clamped to the data).
    pub warnings: Vec<String>,
}

/// The arc the bounded law is calibrated on for `material`: its own
/// goniometer's, or [`CalibrationArc::standard`] when it names none.
pub fn material_arc(material: &Material) -> Result<CalibrationArc, BoundedLawError> {
    match &material.goniometer {
        Some(g) => ArcGeometry::from(g)
            .calibration_arc()
            .map_err(|e| BoundedLawError::BadArc(e.to_string())),
        None => Ok(CalibrationArc::standard()),
    }
}

/// Anything that gives every surface of a room its reflection law: the shipped
/// laws ([`LawKind`]) or a user's own ([`OwnLaw`], `examples/custom_law.rs`).
/// The tracer asks for the band groups, then for the laws of each group.
pub trait LawSet: Sync {
    /// Name of the law, as reported.
    fn law_name(&self) -> String;

    /// Groups of band indices that can share one ray (see
    /// [`LawKind::band_groups`]); one tracing pass runs per group.
    fn band_groups(&self, room: &Room) -> Vec<Vec<usize>>;

    /// The law instances of `room` for the bands in `active`.
    fn laws_for_room(
        &self,
        room: &Room,
        active: &[usize],
        fallback: Option<LawKind>,
    ) -> Result<RoomLaws, LawError>;
}

impl LawSet for LawKind {
    fn law_name(&self) -> String {
        self.name().to_string()
    }

    fn band_groups(&self, room: &Room) -> Vec<Vec<usize>> {
        LawKind::band_groups(*self, room)
    }

    fn laws_for_room(
        &self,
        room: &Room,
        active: &[usize],
        fallback: Option<LawKind>,
    ) -> Result<RoomLaws, LawError> {
        self.build_for_room(room, active, fallback)
    }
}

/// A user's own law, given as a function that builds the law of one material
/// for one band (the material and band set it receives hold that band only).
/// Traced one band per pass, so the law need not handle several bands.
pub struct OwnLaw<F> {
    name: String,
    build: F,
}

impl<F> OwnLaw<F>
where
    F: Fn(&Material, &BandSet) -> Result<Box<dyn ReflectionLaw>, String> + Sync,
{
    /// A law called `name`, built per material and band by `build`; an error
    /// it returns is reported with the material's name.
    pub fn new(name: &str, build: F) -> Self {
        Self {
            name: name.to_string(),
            build,
        }
    }
}

impl<F> LawSet for OwnLaw<F>
where
    F: Fn(&Material, &BandSet) -> Result<Box<dyn ReflectionLaw>, String> + Sync,
{
    fn law_name(&self) -> String {
        self.name.clone()
    }

    fn band_groups(&self, room: &Room) -> Vec<Vec<usize>> {
        (0..room.settings.bands.len()).map(|b| vec![b]).collect()
    }

    fn laws_for_room(
        &self,
        room: &Room,
        active: &[usize],
        _fallback: Option<LawKind>,
    ) -> Result<RoomLaws, LawError> {
        let [band] = active else {
            return Err(LawError::BadData {
                material: String::new(),
                law: "own",
                reason: format!("{} bands in one pass; an own law serves one", active.len()),
            });
        };
        let mut out = RoomLaws {
            laws: Vec::new(),
            surface_law: Vec::with_capacity(room.surfaces.len()),
            fallbacks: Vec::new(),
            warnings: Vec::new(),
        };
        let mut index: HashMap<usize, u32> = HashMap::new();
        for surface in &room.surfaces {
            if let Some(&i) = index.get(&surface.material) {
                out.surface_law.push(i);
                continue;
            }
            let material = &room.materials[surface.material];
            let (one, set) = single_band_inputs(material, &room.settings.bands, *band);
            let law = (self.build)(&one, &set).map_err(|reason| LawError::BadData {
                material: material.name.clone(),
                law: "own",
                reason: format!("{}: {reason}", self.name),
            })?;
            let i = out.laws.len() as u32;
            out.laws.push(Box::new(SingleBand::new(law, *band)));
            index.insert(surface.material, i);
            out.surface_law.push(i);
        }
        Ok(out)
    }
}

impl LawKind {
    /// Every law name accepted by `--law`, in the order of the variants.
    pub const NAME_LIST: &'static [&'static str] = &["split", "bounded", "polar"];

    /// The name given to `--law`.
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            Self::Split => "split",
            Self::Bounded => "bounded",
            Self::Polar => "polar",
        }
    }

    /// The law of one material serving the band indices in `active` (other
    /// bands get weight 0). `extruded` says the surface gives a profile axis
    /// (then the tracer's local +X runs along it). Returns the law and its warnings.
    pub fn build(
        self,
        material: &Material,
        bands: &BandSet,
        active: &[usize],
        extruded: bool,
    ) -> Result<(Box<dyn ReflectionLaw>, Vec<String>), LawError> {
        match self {
            Self::Split => Ok((Box::new(SplitLaw::for_bands(material, active)), Vec::new())),
            Self::Bounded => {
                if material.diffusion.is_none() {
                    return Err(LawError::MissingData {
                        material: material.name.clone(),
                        law: "bounded",
                        missing: "a diffusion coefficient per band (`diffusion = [...]`)".into(),
                    });
                }
                let bad = |e: BoundedLawError| LawError::BadData {
                    material: material.name.clone(),
                    law: "bounded",
                    reason: e.to_string(),
                };
                // Calibrated on the arc the material's d was measured with.
                let arc = material_arc(material).map_err(bad)?;
                let (law, adjustments): (Box<dyn ReflectionLaw>, _) = match active {
                    [band] => {
                        let (one, set) = single_band_inputs(material, bands, *band);
                        let (law, adj) = BoundedLaw::with_arc(&one, &set, &arc).map_err(bad)?;
                        (Box::new(SingleBand::new(Box::new(law), *band)), adj)
                    }
                    _ => {
                        let (law, adj) =
                            BoundedLaw::with_arc(material, bands, &arc).map_err(bad)?;
                        (Box::new(law), adj)
                    }
                };
                // Each adjustment already names the material and band.
                let warnings = adjustments.iter().map(ToString::to_string).collect();
                Ok((law, warnings))
            }
            Self::Polar => {
                let Some(file) = material.polar_file.as_deref() else {
                    return Err(LawError::MissingData {
                        material: material.name.clone(),
                        law: "polar",
                        missing: "a polar data file (`polar = \"file.polar.toml\"` in its table)"
                            .into(),
                    });
                };
                let bad = |reason: String| LawError::BadData {
                    material: material.name.clone(),
                    law: "polar",
                    reason,
                };
                let data = load_polar_file(file).map_err(|e| bad(e.to_string()))?;
                // The polar law takes its mirror part from the material's s:
                // at s = 0 everything leaves by the mirror and the data are
                // never used. Say so, instead of warning about the data.
                if active.iter().all(|&b| material.scattering[b] == 0.0) {
                    let note = format!(
                        "material `{}`: s = 0 in every band traced, so under the polar law all \
                         its energy leaves by the mirror direction and {file} is not used; it \
                         traces exactly as under `split`",
                        material.name,
                        file = file.display()
                    );
                    return Ok((Box::new(SplitLaw::for_bands(material, active)), vec![note]));
                }
                let (law, warnings) =
                    MeasuredPolarLaw::for_bands(material, bands, active, &data, file, extruded)
                        .map_err(|e| bad(e.to_string()))?;
                let warnings = warnings
                    .into_iter()
                    .map(|w| format!("material `{}`: {w}", material.name))
                    .collect();
                Ok((Box::new(law), warnings))
            }
        }
    }

    /// The laws of `room` for the bands in `active`: one instance per
    /// (material, extruded or not) pair that some surface uses. With
    /// `fallback`, a material lacking the data this law needs is traced with
    /// the fallback law and listed in [`RoomLaws::fallbacks`].
    pub fn build_for_room(
        self,
        room: &Room,
        active: &[usize],
        fallback: Option<LawKind>,
    ) -> Result<RoomLaws, LawError> {
        let bands = &room.settings.bands;
        let mut out = RoomLaws {
            laws: Vec::new(),
            surface_law: Vec::with_capacity(room.surfaces.len()),
            fallbacks: Vec::new(),
            warnings: Vec::new(),
        };
        let mut index: HashMap<(usize, bool), u32> = HashMap::new();
        for surface in &room.surfaces {
            let key = (surface.material, surface.profile_axis.is_some());
            if let Some(&i) = index.get(&key) {
                out.surface_law.push(i);
                continue;
            }
            let material = &room.materials[surface.material];
            let built = match self.build(material, bands, active, key.1) {
                Err(LawError::MissingData { missing, .. }) if fallback.is_some() => {
                    let other = fallback.unwrap_or(Self::Split);
                    let note = format!(
                        "material `{}` lacks {missing}; traced with the `{other}` law",
                        material.name
                    );
                    if !out.fallbacks.contains(&note) {
                        out.fallbacks.push(note);
                    }
                    other.build(material, bands, active, key.1)?
                }
                other => other?,
            };
            let (law, warnings) = built;
            for w in warnings {
                if !out.warnings.contains(&w) {
                    out.warnings.push(w);
                }
            }
            let i = out.laws.len() as u32;
            out.laws.push(law);
            index.insert(key, i);
            out.surface_law.push(i);
        }
        Ok(out)
    }

    /// Groups of band indices that can share one ray: bands whose direction
    /// choice is the same in every material. A law's lobe choice depends on
    /// the data listed here; absorption never matters, since it scales each
    /// band's weight exactly. One tracing pass runs per group, so a room whose
    /// coefficients are equal in all bands costs one pass, and a room whose
    /// scattering differs in every band costs one pass per band but never
    /// suffers the compounding weight noise of sharing rays across unequal bands.
    #[must_use]
    pub fn band_groups(self, room: &Room) -> Vec<Vec<usize>> {
        let bands = room.settings.bands.len();
        if self != Self::Split {
            // Measured patterns and bounded-law shapes differ from band to band.
            return (0..bands).map(|b| vec![b]).collect();
        }
        let key = |b: usize| -> Vec<u64> {
            room.materials
                .iter()
                .map(|m| m.scattering[b].to_bits())
                .collect()
        };
        let mut groups: Vec<(Vec<u64>, Vec<usize>)> = Vec::new();
        for b in 0..bands {
            let k = key(b);
            match groups.iter_mut().find(|(gk, _)| *gk == k) {
                Some((_, g)) => g.push(b),
                None => groups.push((k, vec![b])),
            }
        }
        groups.into_iter().map(|(_, g)| g).collect()
    }
}

impl FromStr for LawKind {
    type Err = LawError;

    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s {
            "split" => Ok(Self::Split),
            "bounded" => Ok(Self::Bounded),
            "polar" => Ok(Self::Polar),
            other => Err(LawError::Unknown(other.to_string())),
        }
    }
}

impl fmt::Display for LawKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip_and_unknown_names_list_choices() {
        for name in LawKind::NAME_LIST {
            assert_eq!(LawKind::from_str(name).unwrap().name(), *name);
        }
        let err = LawKind::from_str("mirror").unwrap_err();
        assert!(err.to_string().contains("split"), "{err}");
    }
}
