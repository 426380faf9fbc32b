//! Traced segments per second of a whole `trace::run` (law, air absorption and
//! receivers included) on a 12-triangle shoebox, a ~2,000-triangle hall and
//! the demo hall, with 1 and 2 threads, next to the bare closest-hit queries
//! of the same run for the "run ≤ 1.5 × bare queries" target. Run:
//! `cargo bench --bench trace`; `TRACE_SUMMARY_ONLY=1` skips criterion's
//! groups and prints only the closing summary.
//!
//! The summary times each case again (best of 3) and prints segments/s, the
//! ratio of a one-thread run to the bare replay of its own queries, and the
//! same replay with every query waiting for the previous one ("chained"), as
//! a tracer's queries must: the plain replay overlaps consecutive queries,
//! which no tracer can, so it is the stricter baseline.
//!
//! Measured on the 2-core development machine, quiet (summary, best of 3;
//! criterion medians in brackets): run ÷ bare replay, one thread: shoebox
//! 1.80 (1.82), hall 1.40 (1.43), demo hall 1.24 (1.19); segments/s of a run
//! with 1 / 2 threads: shoebox 9.1 M / 16.6 M, hall 4.6 M / 8.2 M, demo hall
//! 3.9 M / 6.8 M. The hall's run includes its 0.5 ms BVH build.

use std::hint::black_box;
use std::time::Instant;

use criterion::{Criterion, Throughput};
use glam::DVec3;
use polaray::accel::Bvh;
use polaray::bands::{BandSet, Bands};
use polaray::law::LawKind;
use polaray::random::Stream;
use polaray::room::{Material, Receiver, Room, Settings, Source, Surface, Triangle};
use polaray::trace::{self, TraceOptions};

/// A box of `size` whose walls are each cut into `n × n` quads (2 n² triangles
/// per wall, normals inward).
fn tiled_box(size: DVec3, n: usize) -> Room {
    let material = Material {
        name: "wall".into(),
        absorption: Bands::splat(0.15),
        scattering: Bands::splat(0.3),
        diffusion: None,
        polar_file: None,
        goniometer: None,
    };
    let centre = size * 0.5;
    let mut surfaces = Vec::new();
    let mut triangles = Vec::new();
    // Each wall: an origin corner and two edge vectors.
    let walls = [
        (DVec3::ZERO, DVec3::X * size.x, DVec3::Y * size.y),
        (DVec3::Z * size.z, DVec3::X * size.x, DVec3::Y * size.y),
        (DVec3::ZERO, DVec3::Y * size.y, DVec3::Z * size.z),
        (DVec3::X * size.x, DVec3::Y * size.y, DVec3::Z * size.z),
        (DVec3::ZERO, DVec3::X * size.x, DVec3::Z * size.z),
        (DVec3::Y * size.y, DVec3::X * size.x, DVec3::Z * size.z),
    ];
    for (w, (o, a, b)) in walls.iter().enumerate() {
        let mut normal = a.cross(*b).normalize();
        let inward = normal.dot(centre - *o) > 0.0;
        if !inward {
            normal = -normal;
        }
        let surface = surfaces.len() as u32;
        surfaces.push(Surface {
            label: format!("wall{w}"),
            material: 0,
            vertices: vec![*o, *o + *a, *o + *a + *b, *o + *b],
            normal,
            area_m2: a.cross(*b).length(),
            profile_axis: None,
            group: format!("wall{w}"),
        });
        let p = |i: usize, j: usize| *o + *a * (i as f64 / n as f64) + *b * (j as f64 / n as f64);
        for i in 0..n {
            for j in 0..n {
                let (v0, v1, v2, v3) = (p(i, j), p(i + 1, j), p(i + 1, j + 1), p(i, j + 1));
                for t in [[v0, v1, v2], [v0, v2, v3]] {
                    let t = if inward { t } else { [t[0], t[2], t[1]] };
                    triangles.push(Triangle {
                        vertices: t,
                        surface,
                    });
                }
            }
        }
    }
    Room {
        name: format!("tiled box {n}"),
        file: Default::default(),
        settings: Settings {
            bands: BandSet::standard(),
            ..Settings::default()
        },
        materials: vec![material],
        surfaces,
        triangles,
        sources: vec![Source {
            name: "S1".into(),
            position: size * DVec3::new(0.2, 0.5, 0.3),
        }],
        receivers: (0..3)
            .map(|k| Receiver {
                name: format!("R{k}"),
                position: size * DVec3::new(0.4 + 0.15 * k as f64, 0.35 + 0.1 * k as f64, 0.3),
                radius_m: None,
            })
            .collect(),
    }
}

/// Options of a bench run: the room's settings with `rays` and `duration_s`.
fn options_for(room: &Room, rays: usize, duration_s: f64) -> TraceOptions {
    let mut options = TraceOptions::from_room(room, LawKind::Split);
    options.rays = rays;
    options.duration_s = duration_s;
    options
}

fn pool(threads: usize) -> rayon::ThreadPool {
    rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .expect("a rayon pool")
}

/// Hits over the recorded queries, each independent of the others.
fn replay(bvh: &Bvh, queries: &[(DVec3, DVec3)]) -> u64 {
    let mut hits = 0u64;
    for &(o, d) in queries {
        hits += u64::from(bvh.closest_hit(o, d, f64::INFINITY).is_some());
    }
    hits
}

/// Hits over the recorded queries, each waiting for the previous one: its
/// origin is moved by 0 × the previous distance (the same queries, but no
/// overlap between them, as in a tracer).
fn replay_chained(bvh: &Bvh, queries: &[(DVec3, DVec3)]) -> u64 {
    let mut hits = 0u64;
    let mut previous_m = 0.0f64;
    for &(o, d) in queries {
        let o = o + DVec3::splat(previous_m * 0.0);
        if let Some(h) = bvh.closest_hit(o, d, f64::INFINITY) {
            hits += 1;
            previous_m = h.distance_m.min(1.0);
        }
    }
    hits
}

fn bench_room(c: &mut Criterion, label: &str, room: &Room, rays: usize, duration_s: f64) {
    let options = options_for(room, rays, duration_s);
    let segments = trace::run(room, &options).unwrap().stats.segments;
    let mut group = c.benchmark_group(format!("trace/{label}"));
    group.sample_size(10);
    group.throughput(Throughput::Elements(segments));
    for threads in [1, 2] {
        let pool = pool(threads);
        group.bench_function(format!("run_{threads}_threads"), |b| {
            b.iter(|| pool.install(|| trace::run(room, &options).unwrap()))
        });
    }
    // Bare queries, 1: exactly the closest-hit queries the run makes (recorded
    // by `run_recording_queries`, replayed in order): the run ÷ this time is
    // the overhead of laws, air absorption and receivers.
    let (_, recorded) = trace::run_recording_queries(room, &options).unwrap();
    assert_eq!(recorded.len() as u64, segments);
    let bvh = Bvh::build(&room.triangles);
    group.bench_function("bare_run_queries_1_thread", |b| {
        b.iter(|| replay(&bvh, &recorded))
    });
    // Bare queries, 2: as many queries from random interior points in random
    // directions (the BVH bench's kind of rays), for comparison.
    let (lo, hi) = room.triangles.iter().flat_map(|t| t.vertices).fold(
        (DVec3::splat(f64::INFINITY), DVec3::splat(f64::NEG_INFINITY)),
        |(lo, hi), v| (lo.min(v), hi.max(v)),
    );
    let mut rng = Stream::new(1, 0);
    let queries: Vec<(DVec3, DVec3)> = (0..4096)
        .map(|_| {
            let p = lo
                + (hi - lo) * DVec3::new(rng.uniform(), rng.uniform(), rng.uniform()) * 0.98
                + (hi - lo) * 0.01;
            let z = 1.0 - 2.0 * rng.uniform();
            let phi = std::f64::consts::TAU * rng.uniform();
            let s = (1.0 - z * z).sqrt();
            (p, DVec3::new(s * phi.cos(), s * phi.sin(), z))
        })
        .collect();
    group.bench_function("bare_random_queries_1_thread", |b| {
        b.iter(|| {
            let mut hits = 0u64;
            for k in 0..segments as usize {
                let (o, d) = queries[k % queries.len()];
                hits += u64::from(bvh.closest_hit(o, d, 1e3).is_some());
            }
            hits
        })
    });
    group.finish();
}

/// Best time over three calls, seconds.
fn best_of_3(mut f: impl FnMut()) -> f64 {
    (0..3)
        .map(|_| {
            let start = Instant::now();
            f();
            start.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn summary(scenes: &[Scene]) {
    println!("\nsummary: whole runs against the bare replay of their own queries, best of 3");
    println!(
        "{:<26} {:>10} {:>12} {:>12} {:>12} {:>12} {:>10} {:>12} {:>9}",
        "scene",
        "segments",
        "run 1 Mseg/s",
        "run 2 Mseg/s",
        "bare Mq/s",
        "chained Mq/s",
        "run1/bare",
        "run1/chained",
        "build ms"
    );
    let (one, two) = (pool(1), pool(2));
    for scene in scenes {
        let options = options_for(&scene.room, scene.rays, scene.duration_s);
        let (_, recorded) = trace::run_recording_queries(&scene.room, &options).unwrap();
        let bvh = Bvh::build(&scene.room.triangles);
        let n = recorded.len() as f64;
        let run_1 = best_of_3(|| {
            black_box(one.install(|| trace::run(&scene.room, &options).unwrap()));
        });
        let run_2 = best_of_3(|| {
            black_box(two.install(|| trace::run(&scene.room, &options).unwrap()));
        });
        let bare = best_of_3(|| {
            black_box(replay(&bvh, black_box(&recorded)));
        });
        let chained = best_of_3(|| {
            black_box(replay_chained(&bvh, black_box(&recorded)));
        });
        let build = best_of_3(|| {
            black_box(Bvh::build(black_box(&scene.room.triangles)));
        });
        println!(
            "{:<26} {:>10} {:>12.2} {:>12.2} {:>12.2} {:>12.2} {:>10.2} {:>12.2} {:>9.2}",
            scene.label,
            recorded.len(),
            n / run_1 / 1e6,
            n / run_2 / 1e6,
            n / bare / 1e6,
            n / chained / 1e6,
            run_1 / bare,
            run_1 / chained,
            build * 1e3
        );
    }
    println!("(a run includes building its BVH, timed alone in the last column; the target is run1/bare ≤ 1.5)");
}

/// A bench scene: a room and the run settings.
struct Scene {
    label: &'static str,
    room: Room,
    rays: usize,
    duration_s: f64,
}

fn scenes() -> Vec<Scene> {
    let hall = tiled_box(DVec3::new(36.0, 24.0, 14.0), 13);
    assert_eq!(hall.triangles.len(), 2028);
    // The demo recital hall (3,952 triangles, mostly specular walls, six passes
    // because its scattering coefficients differ by band).
    let demo = polaray::room::load_room(std::path::Path::new(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/demo-rooms/recital-hall.toml"
    )))
    .unwrap()
    .room;
    vec![
        Scene {
            label: "shoebox_12_triangles",
            room: tiled_box(DVec3::new(8.0, 6.0, 3.5), 1),
            rays: 4000,
            duration_s: 1.0,
        },
        Scene {
            label: "hall_2028_triangles",
            room: hall,
            rays: 2048,
            duration_s: 1.0,
        },
        Scene {
            label: "demo_hall_3952_triangles",
            room: demo,
            rays: 1000,
            duration_s: 1.9,
        },
    ]
}

fn main() {
    let scenes = scenes();
    // TRACE_SUMMARY_ONLY=1 skips criterion's groups.
    if std::env::var_os("TRACE_SUMMARY_ONLY").is_none() {
        let mut c = Criterion::default().configure_from_args();
        for scene in &scenes {
            bench_room(
                &mut c,
                scene.label,
                &scene.room,
                scene.rays,
                scene.duration_s,
            );
        }
        c.final_summary();
    }
    summary(&scenes);
}
