//! Efficiency of the next-event estimator against detection spheres alone:
//! 1 / (variance × time) per parameter, source–receiver pair and band, the
//! new estimator's ÷ the sphere estimator's, both measured in the same run on
//! the same rays (each estimator traces `ESTIMATOR_BATCHES` (default 20) independent batches; the
//! variance is the spread between batches, the time is the wall time of all
//! batches with the same thread count).
//!
//! Cases: the demo recital hall under the split, bounded and polar laws
//! (`--fallback split` where a material lacks polar data) and the reference
//! shoebox under split. Run: `cargo bench --bench estimator`; set
//! `ESTIMATOR_SUMMARY_ONLY=1` to skip criterion's timing groups and print
//! only the table. The figures measured on the development machine are in
//! DEVELOPERS.md.

use std::path::Path;
use std::time::Instant;

use criterion::Criterion;
use polaray::law::LawKind;
use polaray::report;
use polaray::room::{self, Room};
use polaray::trace::{self, Estimator, TraceOptions};

/// Batches per estimator unless `ESTIMATOR_BATCHES` says otherwise (the
/// variance has batches − 1 degrees of freedom).
const DEFAULT_BATCHES: usize = 20;

/// The batch count of this run.
fn batches() -> usize {
    std::env::var("ESTIMATOR_BATCHES")
        .ok()
        .map_or(DEFAULT_BATCHES, |v| {
            v.parse().expect("ESTIMATOR_BATCHES: a whole number")
        })
}

/// One case: a room file, a law and the rays per source of each batch.
struct Case {
    label: &'static str,
    room: &'static str,
    law: &'static str,
    rays: usize,
}

const CASES: [Case; 4] = [
    Case {
        label: "demo hall, split",
        room: "demo-rooms/recital-hall.toml",
        law: "split",
        rays: 2048,
    },
    Case {
        label: "demo hall, bounded",
        room: "demo-rooms/recital-hall.toml",
        law: "bounded",
        rays: 2048,
    },
    Case {
        label: "demo hall, polar",
        room: "demo-rooms/recital-hall.toml",
        law: "polar",
        rays: 2048,
    },
    Case {
        label: "shoebox, split",
        room: "rooms/shoebox.toml",
        law: "split",
        rays: 2048,
    },
];

/// The parameters compared, by name, with a getter on one band's values.
type Getter = fn(&polaray::metrics::parameters::BandParameters) -> Option<f64>;
const PARAMETERS: [(&str, Getter); 6] = [
    ("T30", |b| b.t30_s),
    ("EDT", |b| b.edt_s),
    ("C80", |b| b.c80_db),
    ("D50", |b| b.d50),
    ("Ts", |b| b.ts_s),
    ("G", |b| b.g_db),
];

fn load(case: &Case) -> Room {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(case.room);
    room::load_room(&path)
        .unwrap_or_else(|e| panic!("{}: {e:#}", path.display()))
        .room
}

fn options(room: &Room, case: &Case, estimator: Estimator) -> TraceOptions {
    let law: LawKind = case.law.parse().expect("known law");
    let mut options = TraceOptions::from_room(room, law);
    options.fallback = Some(LawKind::Split);
    options.rays = case.rays;
    options.estimator = estimator;
    // The same detection radius for both estimators and every batch size.
    options.receiver_radius_m = Some(
        std::env::var("ESTIMATOR_RADIUS_M")
            .ok()
            .map_or(0.5, |v| v.parse().expect("ESTIMATOR_RADIUS_M: metres")),
    );
    options
}

/// Per (parameter, pair, band): the values of every batch; and the wall time, s.
fn measure(room: &Room, options: &TraceOptions) -> (Vec<Vec<Vec<f64>>>, f64) {
    let started = Instant::now();
    let results = trace::run_batches(room, options, batches(), &|_| {}).expect("trace");
    let seconds = started.elapsed().as_secs_f64();
    let mut values = vec![Vec::new(); PARAMETERS.len()];
    for result in &results {
        let cells: Vec<Vec<Option<f64>>> = PARAMETERS
            .iter()
            .map(|(_, get)| {
                report::run_parameters(result)
                    .iter()
                    .flat_map(|p| p.bands.iter().map(get).collect::<Vec<_>>())
                    .collect()
            })
            .collect();
        for (k, cell) in cells.into_iter().enumerate() {
            if values[k].is_empty() {
                values[k] = vec![Vec::new(); cell.len()];
            }
            for (c, v) in cell.into_iter().enumerate() {
                if let Some(v) = v {
                    values[k][c].push(v);
                }
            }
        }
    }
    (values, seconds)
}

fn variance(v: &[f64]) -> Option<f64> {
    if v.len() < batches() {
        return None; // undefined in some batch: not comparable
    }
    let n = v.len() as f64;
    let mean = v.iter().sum::<f64>() / n;
    Some(v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0))
}

/// Prints the cells (pair × band, in result order) where the new estimator's
/// efficiency is below 0.7 of the sphere's or the means differ by more than
/// 3 combined standard errors (z), with both estimators' batch
/// means, spreads and extremes, to find out why (`ESTIMATOR_DETAIL=1`).
fn print_worse_cells(name: &str, sphere: &[Vec<f64>], ne: &[Vec<f64>], time_ratio: f64) {
    for (cell, (a, b)) in sphere.iter().zip(ne).enumerate() {
        let (Some(va), Some(vb)) = (variance(a), variance(b)) else {
            continue;
        };
        let gain = va / vb * time_ratio;
        let mean = |v: &[f64]| v.iter().sum::<f64>() / v.len() as f64;
        let z = (mean(a) - mean(b)) / (va / a.len() as f64 + vb / b.len() as f64).sqrt();
        if gain < 0.7 || z.abs() > 3.0 {
            let describe = |v: &[f64], var: f64| {
                let mean = v.iter().sum::<f64>() / v.len() as f64;
                let lo = v.iter().copied().fold(f64::INFINITY, f64::min);
                let hi = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                format!("mean {mean:.4} sd {:.4} range {lo:.4}..{hi:.4}", var.sqrt())
            };
            println!(
                "  {name} cell {cell} (pair {}, band {}): gain {gain:.2}, z {z:.1}; sphere {}; new {}",
                cell / 6,
                cell % 6,
                describe(a, va),
                describe(b, vb)
            );
        }
    }
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    let n = v.len();
    if n == 0 {
        return f64::NAN;
    }
    if n % 2 == 1 {
        v[n / 2]
    } else {
        0.5 * (v[n / 2 - 1] + v[n / 2])
    }
}

fn summary() {
    println!(
        "efficiency gain = (var × time)_sphere ÷ (var × time)_next-event, {} batches each",
        batches()
    );
    println!(
        "{:<20}{:>10}{:>10}  median [min] per parameter",
        "case", "time s", "time ne"
    );
    let only = std::env::var("ESTIMATOR_CASE").ok();
    for case in CASES
        .iter()
        .filter(|c| only.as_deref().is_none_or(|o| c.label.contains(o)))
    {
        let room = load(case);
        let (sphere, t_sphere) = measure(&room, &options(&room, case, Estimator::Sphere));
        let (ne, t_ne) = measure(&room, &options(&room, case, next_event()));
        let mut line = String::new();
        for (k, (name, _)) in PARAMETERS.iter().enumerate() {
            let gains: Vec<f64> = sphere[k]
                .iter()
                .zip(&ne[k])
                .filter_map(|(a, b)| {
                    let (va, vb) = (variance(a)?, variance(b)?);
                    (vb > 0.0).then(|| (va * t_sphere) / (vb * t_ne))
                })
                .collect();
            let min = gains.iter().copied().fold(f64::INFINITY, f64::min);
            if std::env::var_os("ESTIMATOR_DETAIL").is_some() {
                print_worse_cells(name, &sphere[k], &ne[k], t_sphere / t_ne);
            }
            line += &format!(" {name} {:.1} [{:.1}]", median(gains), min);
        }
        println!("{:<20}{t_sphere:>10.2}{t_ne:>10.2} {line}", case.label);
        if std::env::var_os("ESTIMATOR_VARIANCE").is_some() {
            let mut line = String::new();
            for (k, (name, _)) in PARAMETERS.iter().enumerate() {
                let ratios: Vec<f64> = sphere[k]
                    .iter()
                    .zip(&ne[k])
                    .filter_map(|(a, b)| Some(variance(a)? / variance(b)?))
                    .collect();
                line += &format!(" {name} {:.1}", median(ratios));
            }
            println!("{:<20}variance ratio only:{line}", "");
        }
    }
}

/// The next-event estimator with its default settings, or those of the
/// environment (`ESTIMATOR_LATE_RADIUS_M`, `ESTIMATOR_IMAGE_ORDER`,
/// `ESTIMATOR_RAIN=0` for no next-event scoring) for studies.
fn next_event() -> Estimator {
    let mut s = trace::NextEventSettings::default();
    if let Ok(v) = std::env::var("ESTIMATOR_LATE_RADIUS_M") {
        s.late_radius_m = Some(v.parse().expect("late radius, m"));
    }
    if let Ok(v) = std::env::var("ESTIMATOR_IMAGE_ORDER") {
        s.image_order = v.parse().expect("image order");
    }
    if std::env::var("ESTIMATOR_RAIN").is_ok_and(|v| v == "0") {
        s.rain = false;
    }
    Estimator::NextEvent(s)
}

fn main() {
    if std::env::var_os("ESTIMATOR_SUMMARY_ONLY").is_none() {
        let mut c = Criterion::default().configure_from_args().sample_size(10);
        let case = &CASES[0];
        let room = load(case);
        let mut group = c.benchmark_group("estimator one batch, demo hall split");
        for (name, estimator) in [("sphere", Estimator::Sphere), ("next-event", next_event())] {
            let o = options(&room, case, estimator);
            group.bench_function(name, |b| b.iter(|| trace::run(&room, &o).expect("trace")));
        }
        group.finish();
    }
    summary();
}
