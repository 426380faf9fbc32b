//! Room parameters from energy histograms with known answers.

use polaray::metrics::strength::FREE_FIELD_FLUENCE_10M;
use polaray::metrics::{averages, histogram_parameters, EchogramBand, FitStatus};

/// Energy per bin of a pure exponential decay e^(−k (t − onset)) starting at
/// `onset_s`, each bin the exact integral over its part after the onset.
fn exponential(t60_s: f64, bin_s: f64, onset_s: f64, duration_s: f64) -> Vec<f64> {
    let k = 6.0 * std::f64::consts::LN_10 / t60_s;
    let n = (duration_s / bin_s).round() as usize;
    let cum = |t: f64| 1.0 - (-k * (t - onset_s).max(0.0)).exp();
    (0..n)
        .map(|i| cum((i + 1) as f64 * bin_s) - cum(i as f64 * bin_s))
        .collect()
}

fn band<'a>(
    energy: &'a [f64],
    lateral: Option<&'a [f64]>,
    bin_s: f64,
    onset_s: f64,
) -> EchogramBand<'a> {
    EchogramBand {
        band_hz: 1000,
        energy,
        lateral,
        bin_s,
        onset_s,
    }
}

#[test]
fn pure_exponential_decays_match_closed_forms() {
    // Closed forms for E(t) ∝ e^(−6 ln10 t / T) (derived by integration; /work/shared
    // reference sheet §4): EDT = T20 = T30 = T; C80 = 10 lg(10^(0.48/T) − 1);
    // C50 = 10 lg(10^(0.3/T) − 1); D50 = 1 − 10^(−0.3/T); Ts = T / (6 ln 10).
    // The onset lies mid-bin so the 50/80 ms limits straddle bins (interpolated).
    for &t60 in &[0.4, 1.0, 2.5] {
        let bin = 0.001;
        let onset = 0.0123;
        // Truncated after 1.2 T (72 dB of decay): the tail is continued by the fit.
        let e = exponential(t60, bin, onset, onset + 1.2 * t60);
        let p = histogram_parameters(&band(&e, None, bin, onset));
        for (name, v) in [("EDT", p.edt_s), ("T20", p.t20_s), ("T30", p.t30_s)] {
            let v = v.unwrap_or_else(|| panic!("{name} undefined: {:?}", p.undefined));
            assert!((v / t60 - 1.0).abs() < 2e-3, "{name} = {v} for T = {t60}");
        }
        assert_eq!(p.fits.t30.status, FitStatus::Ok, "{:?}", p.fits.t30.reason);
        assert!(p.fits.t30.correlation.unwrap() < -0.9999);
        let c80 = 10.0 * (10f64.powf(0.48 / t60) - 1.0).log10();
        let c50 = 10.0 * (10f64.powf(0.3 / t60) - 1.0).log10();
        let d50 = 1.0 - 10f64.powf(-0.3 / t60);
        let ts = t60 / (6.0 * std::f64::consts::LN_10);
        assert!(
            (p.c80_db.unwrap() - c80).abs() < 0.01,
            "C80 {} vs {c80}",
            p.c80_db.unwrap()
        );
        assert!(
            (p.c50_db.unwrap() - c50).abs() < 0.01,
            "C50 {} vs {c50}",
            p.c50_db.unwrap()
        );
        assert!(
            (p.d50.unwrap() - d50).abs() < 1e-3,
            "D50 {} vs {d50}",
            p.d50.unwrap()
        );
        assert!(
            (p.ts_s.unwrap() - ts).abs() < 2e-4,
            "Ts {} vs {ts}",
            p.ts_s.unwrap()
        );
        if t60 == 1.0 {
            // Reference sheet §4 check values for T = 1 s.
            assert!((p.c80_db.unwrap() - 3.053).abs() < 0.005);
            assert!((p.d50.unwrap() - 0.4988).abs() < 5e-4);
            assert!((p.ts_s.unwrap() - 0.07238).abs() < 1e-4);
        }
    }
}

#[test]
fn truncation_is_compensated_and_floor_flags_short_histograms() {
    // T = 1 s stopped at 0.45 s (27 dB): without the tail continuation the
    // Schroeder curve bends down at the end. With it, EDT and T20 stay exact; the
    // floor lies at −27 dB, so T20 (bottom −25 dB) has only 2 dB margin and T30
    // (bottom −35 dB) lies below it (ISO 3382-1: bottom ≥ 10 dB above the floor).
    let e = exponential(1.0, 0.001, 0.0, 0.45);
    let p = histogram_parameters(&band(&e, None, 0.001, 0.0));
    let floor = p.floor_db.unwrap();
    assert!((floor + 27.0).abs() < 0.1, "floor {floor}");
    assert!((p.edt_s.unwrap() - 1.0).abs() < 3e-3);
    assert!((p.t20_s.unwrap() - 1.0).abs() < 3e-3);
    assert_eq!(p.fits.t20.status, FitStatus::LowMargin);
    assert!(!p.warnings.is_empty());
    assert_eq!(p.t30_s, None);
    assert_eq!(p.fits.t30.status, FitStatus::BelowFloor);
    assert!(p.undefined["T30_s"].contains("floor"));
    // Ratios use the continuation as late energy: C80 still matches (3.053 dB).
    assert!((p.c80_db.unwrap() - 3.053).abs() < 0.01);
}

#[test]
fn histogram_too_short_for_the_ranges_says_why() {
    let e = exponential(1.0, 0.001, 0.0, 0.06);
    let p = histogram_parameters(&band(&e, None, 0.001, 0.0));
    assert_eq!(p.c80_db, None);
    assert!(p.undefined["C80_db"].contains("80 ms"));
    assert_eq!(p.t30_s, None);
    assert!(p.undefined.contains_key("T30_s"));
    assert!(p.undefined["JLF"].contains("lateral"));
}

#[test]
fn strength_follows_the_inverse_square_law() {
    // ISO 3382-1:2009 A.2.1: G re the free-field level at 10 m; a 1 J source gives
    // 1/(4π r²) J/m² at r (spherical spreading), so 10 m → 0 dB and 5 m → 10 lg 4.
    let mut e = vec![0.0; 200];
    e[3] = FREE_FIELD_FLUENCE_10M;
    let p = histogram_parameters(&band(&e, None, 0.001, 0.003));
    assert!(p.g_db.unwrap().abs() < 1e-9, "G {}", p.g_db.unwrap());
    e[3] = 1.0 / (4.0 * std::f64::consts::PI * 25.0);
    let p = histogram_parameters(&band(&e, None, 0.001, 0.003));
    assert!(
        (p.g_db.unwrap() - 6.0206).abs() < 1e-3,
        "G {}",
        p.g_db.unwrap()
    );
}

#[test]
fn lateral_fraction_limits() {
    // ISO 3382-1:2009 A.3.2: J_LF = E_L(5..80 ms)/E(0..80 ms). All energy lateral →
    // 1 minus the share of the first 5 ms; no lateral energy → 0.
    let t60 = 1.0;
    let k = 6.0 * std::f64::consts::LN_10 / t60;
    let e = exponential(t60, 0.001, 0.0, 1.5);
    let p = histogram_parameters(&band(&e, Some(&e), 0.001, 0.0));
    let expected = ((-k * 0.005).exp() - (-k * 0.080).exp()) / (1.0 - (-k * 0.080).exp());
    assert!(
        (p.jlf.unwrap() - expected).abs() < 1e-9,
        "{} vs {expected}",
        p.jlf.unwrap()
    );
    let none = vec![0.0; e.len()];
    let p = histogram_parameters(&band(&e, Some(&none), 0.001, 0.0));
    assert_eq!(p.jlf, Some(0.0));
    // A lateral series of the wrong length is reported, not guessed.
    let p = histogram_parameters(&band(&e, Some(&none[..10]), 0.001, 0.0));
    assert!(p.undefined["JLF"].contains("bins"));
}

#[test]
fn averages_use_the_iso_bands() {
    // ISO 3382-1:2009 Annex A, Table A.1: EDT, C80, D50, Ts and G over 500 and
    // 1000 Hz; J_LF over 125–1000 Hz.
    let times = [
        (125, 1.6),
        (250, 1.4),
        (500, 1.2),
        (1000, 1.0),
        (2000, 0.9),
        (4000, 0.7),
    ];
    let series: Vec<Vec<f64>> = times
        .iter()
        .map(|&(_, t)| exponential(t, 0.001, 0.0, 1.3 * t))
        .collect();
    let mut lateral: Vec<Vec<f64>> = series.clone();
    for (i, l) in lateral.iter_mut().enumerate() {
        l.iter_mut().for_each(|v| *v *= 0.1 * (i + 1) as f64);
    }
    let params: Vec<_> = times
        .iter()
        .zip(series.iter().zip(&lateral))
        .map(|(&(hz, _), (e, l))| {
            histogram_parameters(&EchogramBand {
                band_hz: hz,
                energy: e,
                lateral: Some(l),
                bin_s: 0.001,
                onset_s: 0.0,
            })
        })
        .collect();
    let a = averages(&params);
    assert!((a.t30_s.unwrap() - 1.1).abs() < 5e-3);
    assert!((a.edt_s.unwrap() - 1.1).abs() < 5e-3);
    let c80 = (params[2].c80_db.unwrap() + params[3].c80_db.unwrap()) / 2.0;
    assert!((a.c80_db.unwrap() - c80).abs() < 1e-12);
    let jlf: f64 = params[..4].iter().map(|p| p.jlf.unwrap()).sum::<f64>() / 4.0;
    assert!((a.jlf.unwrap() - jlf).abs() < 1e-12);
    // Missing 1000 Hz → undefined with a reason.
    let a = averages(&params[..3]);
    assert_eq!(a.t30_s, None);
    assert!(a.undefined["T30_s"].contains("1000 Hz"));
}

#[test]
fn jnd_table_has_sources() {
    use polaray::metrics::jnd_of;
    // ISO 3382-1:2009 Annex A, Table A.1 (see the table's source strings).
    assert_eq!(jnd_of("C80_db").unwrap().value, 1.0);
    assert_eq!(jnd_of("Ts_s").unwrap().value, 0.010);
    assert!((jnd_of("EDT_s").unwrap().in_jnds(2.0, 2.2) - 2.0).abs() < 1e-12);
    assert!(polaray::metrics::JND_TABLE
        .iter()
        .all(|j| !j.source.is_empty()));
}
