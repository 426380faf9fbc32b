//! Traced segments per second of a whole `trace::run` (law, air absorption and
//! receivers included) on a 12-triangle shoebox and a ~2,000-triangle hall,
//! with 1 and 2 threads, next to the bare closest-hit queries of the same
//! scene for the "run ≤ 1.5 × bare queries" target.
//!
//! The scene builder below is local to this bench; the accel branch writes
//! shared generators in `benches/common/` — the integrator may swap them in.

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
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

fn bench_room(c: &mut Criterion, label: &str, room: &Room, rays: usize, duration_s: f64) {
    let mut options = TraceOptions::from_room(room, LawKind::Split);
    options.rays = rays;
    options.duration_s = duration_s;
    let segments = trace::run(room, &options).unwrap().stats.segments;
    let mut group = c.benchmark_group(format!("trace/{label}"));
    group.sample_size(10);
    group.throughput(Throughput::Elements(segments));
    for threads in [1, 2] {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
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
        b.iter(|| {
            let mut hits = 0u64;
            for &(o, d) in &recorded {
                hits += u64::from(bvh.closest_hit(o, d, f64::INFINITY).is_some());
            }
            hits
        })
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

fn benches(c: &mut Criterion) {
    let shoebox = tiled_box(DVec3::new(8.0, 6.0, 3.5), 1);
    bench_room(c, "shoebox_12_triangles", &shoebox, 4000, 1.0);
    let hall = tiled_box(DVec3::new(36.0, 24.0, 14.0), 13);
    assert_eq!(hall.triangles.len(), 2028);
    bench_room(c, "hall_2028_triangles", &hall, 2048, 1.0);
    // The demo recital hall (3,952 triangles, mostly specular walls, six passes
    // because its scattering coefficients differ by band).
    let demo = polaray::room::load_room(std::path::Path::new(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/demo-rooms/recital-hall.toml"
    )))
    .unwrap()
    .room;
    bench_room(c, "demo_hall_3952_triangles", &demo, 1000, 1.9);
}

criterion_group!(trace_benches, benches);
criterion_main!(trace_benches);
