//! Closest-hit throughput of polaray's BVH against the `bvh` and `obvhs`
//! crates on incoherent rays (random origins in the air, uniform
//! directions), on one and two threads. Run: `cargo bench --bench bvh`.
//!
//! After criterion's groups a short summary times each case again
//! (best of 3 passes over the same rays) and prints rays/s, the ratio to
//! polaray, and how often the crates' f32 answers disagree with polaray's.
//!
//! Measured on the 2-core development machine, quiet (summary, Mrays/s, 1 /
//! 2 threads): hall polaray 9.44 / 18.09, `obvhs` 6.52 / 12.79, `bvh` 1.43 /
//! 2.80; shoebox polaray 16.68 / 32.23, `obvhs` 15.15 / 30.34, `bvh` 4.30 /
//! 8.51; 1M-triangle build 0.72 s. Criterion medians agree within 6 %.

mod common;

use std::hint::black_box;
use std::time::{Duration, Instant};

use criterion::{Criterion, SamplingMode, Throughput};
use glam::DVec3;
use polaray::accel::Bvh;
use polaray::room::Triangle;
use rayon::prelude::*;

use common::Ray;

/// Rays per criterion iteration.
const RAYS: usize = 1_000_000;
/// Seed of the ray streams.
const SEED: u64 = 2024;

/// Something that answers closest-hit queries with a distance.
trait Tracer: Sync {
    fn name(&self) -> &'static str;
    fn closest(&self, ray: &Ray) -> Option<f64>;
}

struct Polaray(Bvh);

impl Tracer for Polaray {
    fn name(&self) -> &'static str {
        "polaray"
    }
    fn closest(&self, ray: &Ray) -> Option<f64> {
        self.0
            .closest_hit(ray.origin, ray.direction, f64::INFINITY)
            .map(|h| h.distance_m)
    }
}

/// A triangle for the `bvh` crate (f32, nalgebra points).
struct BvhShape {
    corners: [nalgebra::Point3<f32>; 3],
    node_index: usize,
}

impl bvh::aabb::Bounded<f32, 3> for BvhShape {
    fn aabb(&self) -> bvh::aabb::Aabb<f32, 3> {
        let mut b = bvh::aabb::Aabb::empty();
        for c in &self.corners {
            b.grow_mut(c);
        }
        b
    }
}

impl bvh::bounding_hierarchy::BHShape<f32, 3> for BvhShape {
    fn set_bh_node_index(&mut self, index: usize) {
        self.node_index = index;
    }
    fn bh_node_index(&self) -> usize {
        self.node_index
    }
}

struct BvhCrate {
    bvh: bvh::bvh::Bvh<f32, 3>,
    shapes: Vec<BvhShape>,
}

impl BvhCrate {
    fn new(triangles: &[Triangle]) -> Self {
        let mut shapes: Vec<BvhShape> = triangles
            .iter()
            .map(|t| BvhShape {
                corners: t
                    .vertices
                    .map(|v| nalgebra::Point3::from(v.as_vec3().to_array())),
                node_index: 0,
            })
            .collect();
        let bvh = bvh::bvh::Bvh::build(&mut shapes);
        Self { bvh, shapes }
    }
}

impl Tracer for BvhCrate {
    fn name(&self) -> &'static str {
        "bvh 0.12"
    }
    fn closest(&self, ray: &Ray) -> Option<f64> {
        use bvh::aabb::Bounded;
        let r = bvh::ray::Ray::new(
            nalgebra::Point3::from(ray.origin.as_vec3().to_array()),
            nalgebra::Vector3::from(ray.direction.as_vec3().to_array()),
        );
        // Shapes come nearest box first: stop once a box starts beyond the best hit.
        let mut best = f32::INFINITY;
        for s in self.bvh.nearest_traverse_iterator(&r, &self.shapes) {
            if let Some((entry, _)) = r.intersection_slice_for_aabb(&s.aabb()) {
                if entry > best {
                    break;
                }
            }
            let hit = r.intersects_triangle(&s.corners[0], &s.corners[1], &s.corners[2]);
            if hit.distance > 0.0 && hit.distance < best {
                best = hit.distance;
            }
        }
        best.is_finite().then_some(best as f64)
    }
}

struct Obvhs {
    bvh: obvhs::cwbvh::CwBvh,
    /// Triangles in the BVH's primitive order.
    triangles: Vec<obvhs::triangle::Triangle>,
}

impl Obvhs {
    fn new(triangles: &[Triangle]) -> Self {
        let tris: Vec<obvhs::triangle::Triangle> = triangles
            .iter()
            .map(|t| {
                let [a, b, c] = t.vertices.map(|v| v.as_vec3().to_array());
                obvhs::triangle::Triangle {
                    v0: a.into(),
                    v1: b.into(),
                    v2: c.into(),
                }
            })
            .collect();
        let bvh = obvhs::cwbvh::builder::build_cwbvh_from_tris(
            &tris,
            obvhs::BvhBuildParams::very_slow_build(),
            &mut Duration::default(),
        );
        let triangles = bvh
            .primitive_indices
            .iter()
            .map(|&i| tris[i as usize])
            .collect();
        Self { bvh, triangles }
    }
}

impl Tracer for Obvhs {
    fn name(&self) -> &'static str {
        "obvhs 0.3"
    }
    fn closest(&self, ray: &Ray) -> Option<f64> {
        let r = obvhs::ray::Ray::new_inf(
            ray.origin.as_vec3().to_array().into(),
            ray.direction.as_vec3().to_array().into(),
        );
        let mut hit = obvhs::ray::RayHit::none();
        self.bvh
            .ray_traverse(r, &mut hit, |r, id| self.triangles[id].intersect(r))
            .then_some(hit.t as f64)
    }
}

/// Number of hits over all rays, on the current thread or a rayon pool.
fn trace<T: Tracer>(tracer: &T, rays: &[Ray], pool: Option<&rayon::ThreadPool>) -> usize {
    let count = |chunk: &[Ray]| chunk.iter().filter(|r| tracer.closest(r).is_some()).count();
    match pool {
        None => count(rays),
        Some(pool) => pool.install(|| rays.par_chunks(1024).map(count).sum()),
    }
}

struct Scene {
    name: &'static str,
    triangles: Vec<Triangle>,
    rays: Vec<Ray>,
}

fn scenes() -> Vec<Scene> {
    vec![
        Scene {
            name: "hall",
            triangles: common::hall(),
            rays: common::hall_rays(RAYS, SEED),
        },
        Scene {
            name: "shoebox",
            triangles: common::shoebox(),
            rays: common::shoebox_rays(RAYS, SEED),
        },
    ]
}

fn two_threads() -> rayon::ThreadPool {
    rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .expect("a rayon pool of 2 threads")
}

fn bench_case<T: Tracer>(c: &mut Criterion, scene: &Scene, tracer: &T, pool: &rayon::ThreadPool) {
    let mut group = c.benchmark_group(format!("closest_hit/{}", scene.name));
    group
        .sample_size(10)
        .sampling_mode(SamplingMode::Flat)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(3))
        .throughput(Throughput::Elements(scene.rays.len() as u64));
    group.bench_function(format!("{} 1 thread", tracer.name()), |b| {
        b.iter(|| black_box(trace(tracer, black_box(&scene.rays), None)))
    });
    group.bench_function(format!("{} 2 threads", tracer.name()), |b| {
        b.iter(|| black_box(trace(tracer, black_box(&scene.rays), Some(pool))))
    });
    group.finish();
}

/// Best rays/s over three passes.
fn rays_per_s<T: Tracer>(tracer: &T, rays: &[Ray], pool: Option<&rayon::ThreadPool>) -> f64 {
    (0..3)
        .map(|_| {
            let start = Instant::now();
            black_box(trace(tracer, rays, pool));
            rays.len() as f64 / start.elapsed().as_secs_f64()
        })
        .fold(0.0, f64::max)
}

/// Rays whose hit distance differs from polaray's by more than 1e-4 relative
/// (or that hit in one and miss in the other).
fn disagreements<T: Tracer>(reference: &Polaray, other: &T, rays: &[Ray]) -> usize {
    rays.iter()
        .filter(|r| match (reference.closest(r), other.closest(r)) {
            (Some(a), Some(b)) => (a - b).abs() > 1e-4 * a.max(1.0),
            (None, None) => false,
            _ => true,
        })
        .count()
}

fn summary(scenes: &[Scene], pool: &rayon::ThreadPool) {
    println!("\nsummary: closest hit, {RAYS} incoherent rays, best of 3 passes");
    println!(
        "{:<8} {:<10} {:>12} {:>12} {:>9} {:>9} {:>10}",
        "scene", "library", "1 thr Mray/s", "2 thr Mray/s", "vs ours 1", "vs ours 2", "disagree"
    );
    for scene in scenes {
        let ours = Polaray(Bvh::build(&scene.triangles));
        let ours_1 = rays_per_s(&ours, &scene.rays, None);
        let ours_2 = rays_per_s(&ours, &scene.rays, Some(pool));
        let row = |name: &str, r1: f64, r2: f64, bad: usize| {
            println!(
                "{:<8} {:<10} {:>12.2} {:>12.2} {:>9.2} {:>9.2} {:>10}",
                scene.name,
                name,
                r1 / 1e6,
                r2 / 1e6,
                ours_1 / r1,
                ours_2 / r2,
                bad
            );
        };
        row("polaray", ours_1, ours_2, 0);
        let check = &scene.rays[..scene.rays.len().min(100_000)];
        let other = BvhCrate::new(&scene.triangles);
        row(
            other.name(),
            rays_per_s(&other, &scene.rays, None),
            rays_per_s(&other, &scene.rays, Some(pool)),
            disagreements(&ours, &other, check),
        );
        let other = Obvhs::new(&scene.triangles);
        row(
            other.name(),
            rays_per_s(&other, &scene.rays, None),
            rays_per_s(&other, &scene.rays, Some(pool)),
            disagreements(&ours, &other, check),
        );
    }
    println!(
        "(\"vs ours\" = polaray rays/s ÷ library rays/s; disagreements over the first 100000 rays)"
    );
    build_time();
}

/// Build time of a 1-million-triangle mesh (a finely tessellated sphere in
/// the hall's size).
fn build_time() {
    let (n_theta, n_phi) = (500, 1000);
    let point = |i: usize, j: usize| {
        let theta = std::f64::consts::PI * i as f64 / n_theta as f64;
        let phi = std::f64::consts::TAU * j as f64 / n_phi as f64;
        DVec3::new(
            theta.sin() * phi.cos(),
            theta.sin() * phi.sin(),
            theta.cos(),
        ) * 15.0
    };
    let mut triangles = Vec::with_capacity(2 * n_theta * n_phi);
    for i in 0..n_theta {
        for j in 0..n_phi {
            let (a, b) = (point(i, j), point(i + 1, j));
            let (c, d) = (point(i + 1, j + 1), point(i, j + 1));
            triangles.push(Triangle {
                vertices: [a, b, c],
                surface: 0,
            });
            triangles.push(Triangle {
                vertices: [a, c, d],
                surface: 0,
            });
        }
    }
    let start = Instant::now();
    let bvh = Bvh::build(&triangles);
    println!(
        "build: {} triangles in {:.2} s",
        bvh.triangle_count(),
        start.elapsed().as_secs_f64()
    );
}

fn main() {
    let scenes = scenes();
    let pool = two_threads();
    // BVH_SUMMARY_ONLY=1 skips criterion's groups (quick comparisons while tuning).
    if std::env::var_os("BVH_SUMMARY_ONLY").is_some() {
        summary(&scenes, &pool);
        return;
    }
    let mut c = Criterion::default().configure_from_args();
    for scene in &scenes {
        bench_case(&mut c, scene, &Polaray(Bvh::build(&scene.triangles)), &pool);
        bench_case(&mut c, scene, &BvhCrate::new(&scene.triangles), &pool);
        bench_case(&mut c, scene, &Obvhs::new(&scene.triangles), &pool);
    }
    c.final_summary();
    summary(&scenes, &pool);
}
