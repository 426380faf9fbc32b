//! Choosing a reflection law by name and building one instance per material.
//!
//! The tracer only sees `Vec<Box<dyn ReflectionLaw>>`, indexed like
//! [`Room::materials`]. Adding a law means adding a [`LawKind`] variant, its
//! name in [`LawKind::NAME_LIST`] and one arm in [`LawKind::build`]; the
//! tracer loop does not change.

use std::fmt;
use std::str::FromStr;

use super::{ReflectionLaw, SplitLaw};
use crate::room::{Material, Room};

/// The reflection laws polaray can trace with.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum LawKind {
    /// Lambert split by the scattering coefficient ([`SplitLaw`]).
    Split,
}

/// A law that cannot be chosen or built.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum LawError {
    /// The name is not a known law.
    #[error("unknown reflection law `{0}`; choose one of: {list}", list = LawKind::NAME_LIST.join(", "))]
    Unknown(String),
    /// The material lacks data the law needs.
    #[error("material `{material}`: the `{law}` law needs {missing}")]
    MissingData {
        /// Material name.
        material: String,
        /// Law name.
        law: &'static str,
        /// What to add to the room file.
        missing: String,
    },
}

impl LawKind {
    /// Every law name accepted by `--law`, in the order of the variants.
    pub const NAME_LIST: &'static [&'static str] = &["split"];

    /// The name given to `--law`.
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            Self::Split => "split",
        }
    }

    /// The law of one material serving the band indices in `active` (other
    /// bands get weight 0).
    pub fn build(
        self,
        material: &Material,
        active: &[usize],
    ) -> Result<Box<dyn ReflectionLaw>, LawError> {
        match self {
            Self::Split => Ok(Box::new(SplitLaw::for_bands(material, active))),
        }
    }

    /// One law per material of `room` for the bands in `active`, in the order
    /// of [`Room::materials`].
    pub fn build_for_room(
        self,
        room: &Room,
        active: &[usize],
    ) -> Result<Vec<Box<dyn ReflectionLaw>>, LawError> {
        room.materials
            .iter()
            .map(|m| self.build(m, active))
            .collect()
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
        let key = |b: usize| -> Vec<u64> {
            room.materials
                .iter()
                .map(|m| match self {
                    Self::Split => m.scattering[b].to_bits(),
                })
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
