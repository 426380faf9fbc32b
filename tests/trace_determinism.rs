//! Results depend on the seed only, never on the thread count (the project's
//! determinism rule: per-ray streams, fixed chunks merged in order).

mod common;

use common::*;
use glam::DVec3;
use polaray::bands::Bands;
use polaray::law::LawKind;
use polaray::room::Room;
use polaray::trace::{self, TraceOptions, TraceResult};

fn room() -> Room {
    let mut material = uniform_material("mixed", 0.15, 0.0);
    material.scattering = Bands::from_slice(&[0.2, 0.5]);
    let mut room = shoebox(
        DVec3::new(7.0, 5.0, 3.0),
        material,
        settings(&[500, 2000], true),
        DVec3::new(2.0, 1.5, 1.2),
        &[
            (DVec3::new(5.0, 3.5, 1.5), None),
            (DVec3::new(1.0, 4.0, 1.8), Some(0.4)),
        ],
    );
    // A second source exercises the source-major ray indexing.
    room.sources.push(polaray::room::Source {
        name: "S2".into(),
        position: DVec3::new(6.0, 1.0, 1.0),
    });
    room
}

fn traced(threads: usize, seed: u64) -> TraceResult {
    traced_with(threads, seed, trace::Estimator::Sphere)
}

fn traced_with(threads: usize, seed: u64, estimator: trace::Estimator) -> TraceResult {
    let room = room();
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.estimator = estimator;
    // Several chunks per source, so threads really interleave.
    options.rays = 3 * trace::RAYS_PER_CHUNK + 17;
    options.seed = seed;
    options.duration_s = 0.4;
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .unwrap();
    pool.install(|| trace::run(&room, &options)).unwrap()
}

fn bits(r: &TraceResult) -> Vec<u64> {
    let mut out = Vec::new();
    for p in &r.echograms {
        for b in p.echogram.energy.iter().chain(&p.echogram.lateral) {
            out.extend(b.0.iter().map(|x| x.to_bits()));
        }
    }
    out.push(r.stats.traced_mean_free_path_m.unwrap().to_bits());
    out.extend(r.stats.energy_at_end_j.0.iter().map(|x| x.to_bits()));
    out.push(r.stats.segments);
    out
}

#[test]
fn thread_count_does_not_change_a_bit() {
    let one = bits(&traced(1, 5));
    assert_eq!(one, bits(&traced(2, 5)), "1 vs 2 threads");
    assert_eq!(one, bits(&traced(3, 5)), "1 vs 3 threads");
}

#[test]
fn next_event_estimator_is_thread_count_independent_too() {
    // With next-event scoring (dense arrival logs) and without (sparse).
    for rain in [true, false] {
        let ne = trace::Estimator::NextEvent(trace::NextEventSettings {
            rain,
            ..trace::NextEventSettings::default()
        });
        let one = bits(&traced_with(1, 5, ne));
        assert_eq!(
            one,
            bits(&traced_with(2, 5, ne)),
            "1 vs 2 threads, rain {rain}"
        );
        assert_eq!(
            one,
            bits(&traced_with(3, 5, ne)),
            "1 vs 3 threads, rain {rain}"
        );
        assert_ne!(one, bits(&traced(1, 5)), "the estimators differ");
    }
}

#[test]
fn same_seed_repeats_and_other_seed_differs() {
    let a = traced(2, 5);
    assert_eq!(bits(&a), bits(&traced(2, 5)));
    let b = traced(2, 6);
    assert_ne!(bits(&a), bits(&b));
    // Same direct sound whatever the seed (it is deterministic geometry).
    let d = a.pair(0, 0).echogram.first_nonzero_bin();
    assert_eq!(d, b.pair(0, 0).echogram.first_nonzero_bin());
}

/// The query log the benchmarks use records one query per traced segment and
/// changes nothing in the result (it must not perturb what it measures).
#[test]
fn recording_queries_changes_nothing_and_sees_every_segment() {
    let room = room();
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.rays = 2 * trace::RAYS_PER_CHUNK + 5;
    options.duration_s = 0.4;
    let plain = trace::run(&room, &options).unwrap();
    let (logged, queries) = trace::run_recording_queries(&room, &options).unwrap();
    assert_eq!(bits(&plain), bits(&logged));
    assert_eq!(queries.len() as u64, plain.stats.segments);
    // Ray 0 starts at the source in the recorded order.
    assert_eq!(queries[0].0, room.sources[0].position);
    assert!(queries.iter().all(|(_, d)| (d.length() - 1.0).abs() < 1e-9));
}

/// Batches set `first_ray`: two batches of n rays with stream offsets 0 and n
/// trace exactly the rays of one run of 2n rays (one source), so their mean
/// echogram equals that run's up to the order of floating-point sums.
#[test]
fn batches_with_stream_offsets_partition_a_longer_run() {
    let mut room = room();
    room.sources.truncate(1);
    let n = 2 * trace::RAYS_PER_CHUNK;
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.duration_s = 0.4;
    // Independent start directions (the exact-early estimator spreads each
    // batch's start directions evenly, so its batches are not pieces of one
    // longer run).
    options.estimator = trace::Estimator::Sphere;
    // The default radius depends on the ray count; batches need a fixed one.
    options.receiver_radius_m = Some(0.5);
    options.rays = 2 * n;
    let whole = trace::run(&room, &options).unwrap();
    options.rays = n;
    let first = trace::run(&room, &options).unwrap();
    options.first_ray = n as u64;
    let second = trace::run(&room, &options).unwrap();
    assert_eq!(
        whole.stats.segments,
        first.stats.segments + second.stats.segments
    );
    assert_ne!(
        bits(&first),
        bits(&second),
        "the batches must trace different rays"
    );
    for (w, (a, b)) in whole
        .echograms
        .iter()
        .zip(first.echograms.iter().zip(&second.echograms))
    {
        for (bin, (x, y)) in a.echogram.energy.iter().zip(&b.echogram.energy).enumerate() {
            for band in 0..2 {
                let mean = 0.5 * (x[band] + y[band]);
                let expected = w.echogram.energy[bin][band];
                // Rounding only: the sums run in a different order (common practice, no source).
                assert!(
                    (mean - expected).abs() <= 1e-12 * expected.abs().max(1e-30),
                    "bin {bin} band {band}: {mean} vs {expected}"
                );
            }
        }
    }
}

/// `run_batches` builds the laws once, yet each batch equals a separate run
/// with the matching `first_ray`, bit for bit (at a fixed radius: the default
/// radius counts the rays of all batches, see `tests/run_uncertainty.rs`).
#[test]
fn batches_in_one_call_equal_separate_runs() {
    let room = room();
    let mut options = TraceOptions::from_room(&room, LawKind::Split);
    options.receiver_radius_m = Some(0.4);
    options.rays = trace::RAYS_PER_CHUNK + 9;
    options.duration_s = 0.3;
    options.first_ray = 11;
    let batched = trace::run_batches(&room, &options, 3, &|_| {}).unwrap();
    assert_eq!(batched.len(), 3);
    let per_batch = (options.rays * room.sources.len()) as u64;
    for (b, got) in batched.iter().enumerate() {
        let mut one = options.clone();
        one.first_ray = 11 + b as u64 * per_batch;
        let alone = trace::run(&room, &one).unwrap();
        assert_eq!(bits(got), bits(&alone), "batch {b}");
    }
}
