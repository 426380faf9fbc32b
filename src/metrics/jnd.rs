//! Just noticeable differences of the room parameters, so that reports can state
//! a difference in JNDs (ISO 3382-1:2009, Annex A, Table A.1).

use serde::Serialize;

/// How a JND applies.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum JndKind {
    /// A fraction of the reference value (e.g. 5 % of EDT).
    Relative,
    /// An amount in the parameter's own unit (dB, s, ratio).
    Absolute,
}

/// One JND entry.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Jnd {
    /// Parameter field name as in [`super::BandParameters`]' JSON (`"C80_db"` …).
    pub parameter: &'static str,
    /// The JND: a fraction for `Relative`, else in the parameter's unit.
    pub value: f64,
    /// Relative or absolute.
    pub kind: JndKind,
    /// Where the value comes from.
    pub source: &'static str,
}

impl Jnd {
    /// The difference `b − a` expressed in JNDs (relative JNDs use `a` as reference).
    #[must_use]
    pub fn in_jnds(&self, a: f64, b: f64) -> f64 {
        match self.kind {
            JndKind::Relative => (b - a) / (self.value * a.abs()),
            JndKind::Absolute => (b - a) / self.value,
        }
    }
}

/// The JND table.
pub const JND_TABLE: [Jnd; 9] = [
    Jnd {
        parameter: "EDT_s",
        value: 0.05,
        kind: JndKind::Relative,
        source: "ISO 3382-1:2009 Annex A, Table A.1: EDT, subjective limen 5 %",
    },
    Jnd {
        parameter: "T20_s",
        value: 0.05,
        kind: JndKind::Relative,
        source: "common practice, no source: 5 % as for EDT (ISO 3382-1 Table A.1 lists no T)",
    },
    Jnd {
        parameter: "T30_s",
        value: 0.05,
        kind: JndKind::Relative,
        source: "common practice, no source: 5 % as for EDT (ISO 3382-1 Table A.1 lists no T)",
    },
    Jnd {
        parameter: "C80_db",
        value: 1.0,
        kind: JndKind::Absolute,
        source: "ISO 3382-1:2009 Annex A, Table A.1: C80, 1 dB",
    },
    Jnd {
        parameter: "C50_db",
        value: 1.0,
        kind: JndKind::Absolute,
        source: "common practice: 1 dB as for C80 (ISO 3382-1 Table A.1 lists C80; from memory)",
    },
    Jnd {
        parameter: "D50",
        value: 0.05,
        kind: JndKind::Absolute,
        source: "ISO 3382-1:2009 Annex A, Table A.1: D50, 0.05",
    },
    Jnd {
        parameter: "Ts_s",
        value: 0.010,
        kind: JndKind::Absolute,
        source: "ISO 3382-1:2009 Annex A, Table A.1: Ts, 10 ms",
    },
    Jnd {
        parameter: "G_db",
        value: 1.0,
        kind: JndKind::Absolute,
        source: "ISO 3382-1:2009 Annex A, Table A.1: G, 1 dB (from memory)",
    },
    Jnd {
        parameter: "JLF",
        value: 0.05,
        kind: JndKind::Absolute,
        source: "ISO 3382-1:2009 Annex A, Table A.1: J_LF, 0.05 (from memory)",
    },
];

/// The JND of a parameter by field name.
#[must_use]
pub fn jnd_of(parameter: &str) -> Option<&'static Jnd> {
    JND_TABLE.iter().find(|j| j.parameter == parameter)
}
