//! Least-squares line over a decay-curve range: EDT, T20, T30 (ISO 3382-1:2009
//! clause 3 definitions and 5.3; ranges 0/−10, −5/−25, −5/−35 dB).

use serde::Serialize;

/// An evaluation range of the decay curve, dB re the total energy.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct DecayRange {
    /// Name of the quantity the range gives (`EDT`, `T20`, `T30`).
    pub name: &'static str,
    /// Upper end of the range (dB, ≤ 0).
    pub top_db: f64,
    /// Lower end of the range (dB).
    pub bottom_db: f64,
}

/// Early decay time range, 0 to −10 dB (ISO 3382-1:2009, 3.2 / A.2.2).
pub const EDT_RANGE: DecayRange = DecayRange {
    name: "EDT",
    top_db: 0.0,
    bottom_db: -10.0,
};
/// T20 range, −5 to −25 dB (ISO 3382-1:2009, 3.5).
pub const T20_RANGE: DecayRange = DecayRange {
    name: "T20",
    top_db: -5.0,
    bottom_db: -25.0,
};
/// T30 range, −5 to −35 dB (ISO 3382-1:2009, 3.5).
pub const T30_RANGE: DecayRange = DecayRange {
    name: "T30",
    top_db: -5.0,
    bottom_db: -35.0,
};

/// Margin the bottom of a range must keep above the noise or truncation floor, dB
/// (ISO 3382-1:2009, 5.3.3 / Table 1 read as "bottom ≥ 10 dB above the floor").
pub const FLOOR_MARGIN_DB: f64 = 10.0;

/// How a fit went.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FitStatus {
    /// Range reached and at least 10 dB above the floor.
    Ok,
    /// Value given, but the range bottom lies less than 10 dB above the floor.
    LowMargin,
    /// The decay curve never falls to the bottom of the range.
    RangeNotReached,
    /// The range bottom lies below the floor: only the extrapolated tail is there.
    BelowFloor,
    /// Fewer than three points inside the range (bins too coarse).
    TooFewPoints,
    /// The fitted line does not fall.
    NotDecaying,
}

/// Result of fitting one range.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct DecayFit {
    /// Range used.
    pub range: DecayRange,
    /// Reverberation time from the slope, −60 / slope (s); `None` when undefined.
    pub time_s: Option<f64>,
    /// Pearson correlation coefficient of the fitted points (≈ −1 for a straight decay).
    pub correlation: Option<f64>,
    /// Slope of the line (dB/s).
    pub slope_db_per_s: Option<f64>,
    /// Level of the line at t = 0 (dB); the line is `intercept + slope · t`.
    pub intercept_db: Option<f64>,
    /// Time (s after the direct sound) of the first and last fitted points.
    pub span_s: Option<(f64, f64)>,
    /// Points fitted.
    pub points: usize,
    /// Range bottom minus floor (dB) when a floor is known.
    pub floor_margin_db: Option<f64>,
    /// Outcome.
    pub status: FitStatus,
    /// Why the value is missing or doubtful; `None` when `status` is `Ok`.
    pub reason: Option<String>,
}

/// Least-squares line `level = a + b t` and Pearson r of the points.
#[must_use]
pub fn line_fit(times_s: &[f64], level_db: &[f64]) -> Option<(f64, f64, f64)> {
    let n = times_s.len();
    if n < 2 || level_db.len() != n {
        return None;
    }
    let nf = n as f64;
    let mt = times_s.iter().sum::<f64>() / nf;
    let ml = level_db.iter().sum::<f64>() / nf;
    let (mut stt, mut sll, mut stl) = (0.0, 0.0, 0.0);
    for (t, l) in times_s.iter().zip(level_db) {
        let (dt, dl) = (t - mt, l - ml);
        stt += dt * dt;
        sll += dl * dl;
        stl += dt * dl;
    }
    if stt <= 0.0 {
        return None;
    }
    let slope = stl / stt;
    let r = if sll > 0.0 {
        stl / (stt * sll).sqrt()
    } else {
        0.0
    };
    Some((ml - slope * mt, slope, r))
}

/// Fits `range` on a decay curve (times ascending, levels non-increasing, dB re
/// total) with an optional floor (dB, same scale). The points used are those whose
/// level lies within [bottom, top].
#[must_use]
pub fn fit_decay(
    times_s: &[f64],
    level_db: &[f64],
    range: DecayRange,
    floor_db: Option<f64>,
) -> DecayFit {
    let mut fit = DecayFit {
        range,
        time_s: None,
        correlation: None,
        slope_db_per_s: None,
        intercept_db: None,
        span_s: None,
        points: 0,
        floor_margin_db: floor_db.map(|f| range.bottom_db - f),
        status: FitStatus::Ok,
        reason: None,
    };
    if let Some(f) = floor_db {
        if range.bottom_db < f {
            fit.status = FitStatus::BelowFloor;
            fit.reason = Some(format!(
                "{}: range bottom {} dB lies below the noise/truncation floor at {:.1} dB",
                range.name, range.bottom_db, f
            ));
            return fit;
        }
    }
    let lowest = level_db.iter().copied().fold(f64::INFINITY, f64::min);
    if lowest.is_nan() || lowest > range.bottom_db {
        fit.status = FitStatus::RangeNotReached;
        fit.reason = Some(format!(
            "{}: the decay curve falls only to {:.1} dB, not to {} dB",
            range.name, lowest, range.bottom_db
        ));
        return fit;
    }
    let start = level_db
        .iter()
        .position(|&l| l <= range.top_db)
        .unwrap_or(0);
    let end = level_db
        .iter()
        .position(|&l| l < range.bottom_db)
        .unwrap_or(level_db.len());
    if end < start + 3 {
        fit.status = FitStatus::TooFewPoints;
        fit.reason = Some(format!(
            "{}: only {} points between {} and {} dB; use finer time bins",
            range.name,
            end.saturating_sub(start),
            range.top_db,
            range.bottom_db
        ));
        return fit;
    }
    let (t, l) = (&times_s[start..end], &level_db[start..end]);
    fit.points = t.len();
    fit.span_s = Some((t[0], t[t.len() - 1]));
    let Some((intercept, slope, r)) = line_fit(t, l) else {
        fit.status = FitStatus::TooFewPoints;
        fit.reason = Some(format!("{}: the fitted points share one time", range.name));
        return fit;
    };
    fit.slope_db_per_s = Some(slope);
    fit.intercept_db = Some(intercept);
    fit.correlation = Some(r);
    if slope >= 0.0 {
        fit.status = FitStatus::NotDecaying;
        fit.reason = Some(format!("{}: the fitted line does not fall", range.name));
        return fit;
    }
    fit.time_s = Some(-60.0 / slope);
    if let Some(m) = fit.floor_margin_db {
        if m < FLOOR_MARGIN_DB {
            fit.status = FitStatus::LowMargin;
            fit.reason = Some(format!(
                "{}: range bottom only {:.1} dB above the noise/truncation floor (ISO 3382-1 asks for {} dB)",
                range.name, m, FLOOR_MARGIN_DB
            ));
        }
    }
    fit
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn straight_line_gives_its_slope() {
        // A line of −60 dB/s is T = 1 s by definition (ISO 3382-1 clause 3.5).
        let t: Vec<f64> = (0..100).map(|i| i as f64 * 0.01).collect();
        let l: Vec<f64> = t.iter().map(|t| -60.0 * t).collect();
        let f = fit_decay(&t, &l, T20_RANGE, None);
        assert_eq!(f.status, FitStatus::Ok);
        assert!((f.time_s.unwrap() - 1.0).abs() < 1e-12);
        assert!((f.correlation.unwrap() + 1.0).abs() < 1e-12);
        let f = fit_decay(&t, &l, T30_RANGE, Some(-40.0));
        assert_eq!(f.status, FitStatus::LowMargin);
        let short: Vec<f64> = l.iter().map(|x| x.max(-30.0)).collect();
        assert_eq!(
            fit_decay(&t, &short, T30_RANGE, None).status,
            FitStatus::RangeNotReached
        );
    }
}
