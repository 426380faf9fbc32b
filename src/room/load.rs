//! Loading a room file (TOML, optionally with an OBJ mesh) into a checked [`Room`].
//!
//! The loader collects every problem it can find before giving up, so a user
//! fixes a file in one pass: schema errors (with line and column from the
//! toml crate) stop early; everything after that is gathered.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

use glam::DVec3;

use crate::air::AirConditions;
use crate::bands::{BandSet, Bands, MAX_BANDS};

use super::file::{BoxFile, MaterialFile, MeshFile, Point, Real, RoomFile, SettingsFile};
use super::{inside, obj, pairs, polygon, topology};
use super::{Material, Receiver, Room, Settings, Source, Surface, Triangle};

/// A room that loaded, with the warnings found on the way (warnings don't fail).
#[derive(Debug)]
pub struct LoadedRoom {
    /// The checked room.
    pub room: Room,
    /// Human-readable warnings, each naming the item concerned.
    pub warnings: Vec<String>,
}

/// A room file that cannot be used.
#[derive(Debug, thiserror::Error)]
#[error("{}: {}", .file.display(), .problems.join("\n  "))]
pub struct RoomError {
    /// The room file.
    pub file: PathBuf,
    /// Every problem found, each naming the item and what is wrong.
    pub problems: Vec<String>,
}

/// Closest a source may come to a surface, metres.
pub const MIN_SOURCE_CLEARANCE_M: f64 = 1e-3;

/// Most items of one kind (open edges, disagreements) listed in a message.
const LIST_LIMIT: usize = 12;

/// Number of probe rays used to see which side of the surfaces a source faces
/// in an open model.
const PROBE_RAYS: usize = 128;

/// Loads and checks a room file.
pub fn load_room(path: &Path) -> Result<LoadedRoom, RoomError> {
    let fail = |problems: Vec<String>| RoomError {
        file: path.to_path_buf(),
        problems,
    };
    let text = std::fs::read_to_string(path).map_err(|e| {
        fail(vec![format!(
            "cannot read the room file: {}",
            crate::messages::io_problem(&e)
        )])
    })?;
    let file: RoomFile =
        toml::from_str(&text).map_err(|e| fail(vec![crate::messages::toml_problem(&e)]))?;
    let dir = path.parent().unwrap_or(Path::new("")).to_path_buf();

    let mut b = Builder::default();
    let (settings, band_count) = b.settings(&file.settings);
    let (materials, names) = b.materials(&file.materials, band_count, &dir);

    // Surfaces as given: explicit polygons, then the box, then the mesh.
    let mut raw = Vec::new();
    for (i, s) in file.surfaces.iter().enumerate() {
        let label = format!("surfaces[{i}]");
        let material = b.material_index(&names, &s.material, &label);
        let profile_axis = s.profile_axis.map(|a| point(&a));
        raw.push(RawSurface {
            label,
            material,
            vertices: s.vertices.iter().map(point).collect(),
            group: s.group.clone().unwrap_or_else(|| s.material.clone()),
            profile_axis,
            axis_from: None,
        });
    }
    if let Some(bx) = &file.shoebox {
        b.shoebox(bx, &names, &mut raw);
    }
    if let Some(mesh) = &file.mesh {
        b.mesh(mesh, &dir, &names, &mut raw);
    }
    if file.surfaces.is_empty() && file.shoebox.is_none() && file.mesh.is_none() {
        b.problem("the room has no surfaces: give [[surfaces]], [box] or [mesh]".into());
    }

    let (surfaces, triangles) = b.geometry(raw, settings.open);
    let scene = Scene {
        points: triangles.iter().map(|t| t.vertices).collect(),
        surfaces: &surfaces,
        triangles: &triangles,
        closed: b.closed,
        open: settings.open,
    };
    let sources = b.sources(&file, &scene);
    let receivers = b.receivers(&file, &scene);

    // Materials nobody uses, and (scattering, diffusion) pairs.
    let mut used = vec![false; materials.len()];
    for s in &surfaces {
        if let Some(u) = used.get_mut(s.material) {
            *u = true;
        }
    }
    for (m, u) in materials.iter().zip(&used) {
        if !u {
            b.warn(format!(
                "materials.{}: defined but no surface uses it",
                m.name
            ));
        }
    }
    if b.problems.is_empty() {
        let pair_problems = pairs::check_material_pairs(&materials, &settings.bands);
        b.problems.extend(pair_problems);
    }

    if !b.problems.is_empty() {
        return Err(fail(b.problems));
    }
    let name = file.name.clone().unwrap_or_else(|| {
        path.file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default()
    });
    Ok(LoadedRoom {
        room: Room {
            name,
            file: path.to_path_buf(),
            settings,
            materials,
            surfaces,
            triangles,
            sources,
            receivers,
        },
        warnings: b.warnings,
    })
}

/// One material table in the room-file format (`[materials.<name>]`), checked
/// as the room loader checks its own: `band_count` values per list, each in
/// [0, 1], the (scattering, diffusion) pairs within the bound, the polar file
/// resolved relative to `dir`. Other files (comparison files) use it to define
/// materials. Returns the material and its warnings, or every problem found,
/// each naming `materials.<name>.<field>`.
pub fn material_from_table(
    name: &str,
    table: &MaterialFile,
    bands: &BandSet,
    dir: &Path,
) -> Result<(Material, Vec<String>), Vec<String>> {
    let mut b = Builder::default();
    let material = b.material(name, table, bands.len(), dir);
    if b.problems.is_empty() {
        b.problems.extend(pairs::check_material_pairs(
            std::slice::from_ref(&material),
            bands,
        ));
    }
    if b.problems.is_empty() {
        Ok((material, b.warnings))
    } else {
        Err(b.problems)
    }
}

/// The checked geometry that sources and receivers are placed in.
struct Scene<'a> {
    surfaces: &'a [Surface],
    triangles: &'a [Triangle],
    points: Vec<[DVec3; 3]>,
    closed: bool,
    open: bool,
}

/// A surface before geometry checks.
struct RawSurface {
    label: String,
    material: Option<usize>,
    vertices: Vec<DVec3>,
    group: String,
    profile_axis: Option<DVec3>,
    /// Where a profile axis shared by many faces was given
    /// (`mesh.profile_axes.RearWall`), so its warnings come once per entry.
    axis_from: Option<String>,
}

#[derive(Default)]
struct Builder {
    problems: Vec<String>,
    warnings: Vec<String>,
    /// Whether the geometry came out closed (every edge shared by two surfaces).
    closed: bool,
    /// Whether some geometry was left out because of an earlier problem (then
    /// closedness is not judged, to avoid follow-on messages).
    incomplete: bool,
}

fn point(p: &Point) -> DVec3 {
    DVec3::new(p[0].0, p[1].0, p[2].0)
}

fn fmt_point(p: DVec3) -> String {
    format!("({:.3}, {:.3}, {:.3})", p.x, p.y, p.z)
}

fn finite(p: DVec3) -> bool {
    p.is_finite()
}

/// "a, b, c" with at most [`LIST_LIMIT`] names and a count of the rest.
fn list_names(names: &[String]) -> String {
    let mut s = names
        .iter()
        .take(LIST_LIMIT)
        .cloned()
        .collect::<Vec<_>>()
        .join(", ");
    if names.len() > LIST_LIMIT {
        s.push_str(&format!(" and {} more", names.len() - LIST_LIMIT));
    }
    s
}

impl Builder {
    fn problem(&mut self, p: String) {
        self.problems.push(p);
    }

    fn warn(&mut self, w: String) {
        self.warnings.push(w);
    }

    /// `[settings]` with defaults; returns the settings and the number of bands
    /// per-band lists must have.
    fn settings(&mut self, s: &SettingsFile) -> (Settings, usize) {
        let mut out = Settings::default();
        let mut band_count = out.bands.len();
        if let Some(list) = &s.bands_hz {
            band_count = list.len();
            match BandSet::new(list) {
                Ok(set) => out.bands = set,
                Err(e) => self.problem(format!("settings.bands_hz: {e}")),
            }
        }
        if let Some(rays) = s.rays {
            if rays == 0 {
                self.problem("settings.rays: must be at least 1".into());
            }
            out.rays = rays;
        }
        if let Some(Real(bin)) = s.bin_s {
            if !(bin.is_finite() && bin > 0.0) {
                self.problem(format!(
                    "settings.bin_s: must be a positive number of seconds, found {bin}"
                ));
            }
            out.bin_s = bin;
        }
        if let Some(Real(d)) = s.duration_s {
            if !(d.is_finite() && d > 0.0) {
                self.problem(format!(
                    "settings.duration_s: must be a positive number of seconds, found {d}"
                ));
            } else if d < out.bin_s {
                self.problem(format!(
                    "settings.duration_s: {d} s is shorter than one bin ({} s)",
                    out.bin_s
                ));
            }
            out.duration_s = Some(d);
        }
        if let Some(seed) = s.seed {
            out.seed = seed;
        }
        let mut air = AirConditions::default();
        if let Some(Real(t)) = s.temperature_c {
            if !(t.is_finite() && t > -273.15) {
                self.problem(format!(
                    "settings.temperature_c: {t} °C is not a possible air temperature"
                ));
            } else if !(-20.0..=50.0).contains(&t) {
                // ISO 9613-1:1993, clause 1: stated for −20 °C to +50 °C.
                self.warn(format!(
                    "settings.temperature_c: {t} °C is outside −20 to 50 °C, where the ISO 9613-1 air absorption is stated"
                ));
            }
            air.temperature_c = t;
        }
        if let Some(Real(h)) = s.humidity_pct {
            if !(h.is_finite() && (0.0..=100.0).contains(&h)) {
                self.problem(format!(
                    "settings.humidity_pct: {h} % is not a relative humidity; give 0 to 100"
                ));
            } else if h < 10.0 {
                // ISO 9613-1:1993, clause 1: stated for 10 % to 100 %.
                self.warn(format!(
                    "settings.humidity_pct: {h} % is below 10 %, where the ISO 9613-1 air absorption is stated"
                ));
            }
            air.humidity_pct = h;
        }
        if let Some(Real(p)) = s.pressure_kpa {
            if !(p.is_finite() && p > 0.0) {
                self.problem(format!(
                    "settings.pressure_kpa: {p} kPa is not a possible pressure"
                ));
            }
            air.pressure_kpa = p;
        }
        out.air = air;
        if let Some(a) = s.air_absorption {
            out.air_absorption = a;
        }
        if let Some(o) = s.open {
            out.open = o;
        }
        (out, band_count)
    }

    /// `[materials]`; returns the materials and a name → index map.
    fn materials(
        &mut self,
        table: &BTreeMap<String, MaterialFile>,
        band_count: usize,
        dir: &Path,
    ) -> (Vec<Material>, BTreeMap<String, usize>) {
        let mut materials = Vec::new();
        let mut names = BTreeMap::new();
        for (name, m) in table {
            names.insert(name.clone(), materials.len());
            materials.push(self.material(name, m, band_count, dir));
        }
        (materials, names)
    }

    /// One material table, its polar file resolved relative to `dir`.
    fn material(
        &mut self,
        name: &str,
        m: &MaterialFile,
        band_count: usize,
        dir: &Path,
    ) -> Material {
        let absorption = self.coefficients(name, "absorption", &m.absorption, band_count);
        let scattering = self.coefficients(name, "scattering", &m.scattering, band_count);
        let diffusion = m
            .diffusion
            .as_ref()
            .map(|d| self.coefficients(name, "diffusion", d, band_count));
        let polar_file = m.polar.as_ref().map(|p| {
            let resolved = dir.join(p);
            if !resolved.is_file() {
                self.warn(format!(
                    "materials.{name}.polar: {} does not exist (needed only by the polar-response law)",
                    resolved.display()
                ));
            }
            resolved
        });
        let goniometer = m.goniometer.as_ref().map(|g| {
            let geometry = g.resolve();
            if let Some(problem) = geometry.problem() {
                self.problem(format!("materials.{name}.goniometer: {problem}"));
            }
            if m.diffusion.is_none() {
                self.warn(format!(
                    "materials.{name}.goniometer: given but the material has no diffusion coefficients, so nothing uses it"
                ));
            }
            geometry
        });
        Material {
            name: name.to_string(),
            absorption,
            scattering,
            diffusion,
            polar_file,
            goniometer,
        }
    }

    /// One per-band coefficient list: right length, finite, within [0, 1].
    fn coefficients(&mut self, name: &str, field: &str, values: &[Real], n: usize) -> Bands {
        if values.len() != n {
            self.problem(format!(
                "materials.{name}.{field}: expected {n} values (one per band of settings.bands_hz), found {}",
                values.len()
            ));
        }
        for (i, Real(v)) in values.iter().enumerate() {
            if !(v.is_finite() && (0.0..=1.0).contains(v)) {
                self.problem(format!(
                    "materials.{name}.{field}[{i}]: {v} is outside [0, 1]; coefficients are fractions of energy"
                ));
            }
        }
        let v: Vec<f64> = values.iter().take(MAX_BANDS).map(|r| r.0).collect();
        Bands::from_slice(&v[..v.len().min(n)])
    }

    fn material_index(
        &mut self,
        names: &BTreeMap<String, usize>,
        material: &str,
        item: &str,
    ) -> Option<usize> {
        let found = names.get(material).copied();
        if found.is_none() {
            let defined: Vec<String> = names.keys().cloned().collect();
            self.problem(format!(
                "{item}: material `{material}` is not defined in [materials] (defined: {})",
                if defined.is_empty() {
                    "none".to_string()
                } else {
                    defined.join(", ")
                }
            ));
        }
        found
    }

    /// The six faces of `[box]`, with normals into the box.
    fn shoebox(
        &mut self,
        bx: &BoxFile,
        names: &BTreeMap<String, usize>,
        raw: &mut Vec<RawSurface>,
    ) {
        let size = point(&bx.size_m);
        if !(finite(size) && size.min_element() > 0.0) {
            self.problem(format!(
                "box.size_m: every size must be a positive number of metres, found {}",
                fmt_point(size)
            ));
            return;
        }
        let o = bx.origin_m.map(|p| point(&p)).unwrap_or(DVec3::ZERO);
        if !finite(o) {
            self.problem("box.origin_m: coordinates must be finite".into());
            return;
        }
        const FACES: [&str; 6] = ["floor", "ceiling", "x0", "x1", "y0", "y1"];
        for omitted in &bx.omit {
            if !FACES.contains(&omitted.as_str()) {
                self.problem(format!(
                    "box.omit: `{omitted}` is not a face; use floor, ceiling, x0, x1, y0 or y1"
                ));
            }
        }
        for key in bx.profile_axes.keys() {
            if !FACES.contains(&key.as_str()) {
                self.problem(format!(
                    "box.profile_axes: `{key}` is not a face; use floor, ceiling, x0, x1, y0 or y1"
                ));
            }
        }
        let c = |x: f64, y: f64, z: f64| o + DVec3::new(x, y, z) * size;
        let faces: [(&str, Option<&String>, [DVec3; 4]); 6] = [
            (
                "floor",
                bx.floor.as_ref(),
                [c(0., 0., 0.), c(1., 0., 0.), c(1., 1., 0.), c(0., 1., 0.)],
            ),
            (
                "ceiling",
                bx.ceiling.as_ref(),
                [c(0., 0., 1.), c(0., 1., 1.), c(1., 1., 1.), c(1., 0., 1.)],
            ),
            (
                "x0",
                bx.x0.as_ref().or(bx.walls.as_ref()),
                [c(0., 0., 0.), c(0., 1., 0.), c(0., 1., 1.), c(0., 0., 1.)],
            ),
            (
                "x1",
                bx.x1.as_ref().or(bx.walls.as_ref()),
                [c(1., 0., 0.), c(1., 0., 1.), c(1., 1., 1.), c(1., 1., 0.)],
            ),
            (
                "y0",
                bx.y0.as_ref().or(bx.walls.as_ref()),
                [c(0., 0., 0.), c(0., 0., 1.), c(1., 0., 1.), c(1., 0., 0.)],
            ),
            (
                "y1",
                bx.y1.as_ref().or(bx.walls.as_ref()),
                [c(0., 1., 0.), c(1., 1., 0.), c(1., 1., 1.), c(0., 1., 1.)],
            ),
        ];
        for (face, material, vertices) in faces {
            if bx.omit.iter().any(|f| f == face) {
                continue;
            }
            let label = format!("box.{face}");
            let Some(material) = material else {
                let hint = if face.starts_with('x') || face.starts_with('y') {
                    format!("`{face} = \"...\"` or `walls = \"...\"`")
                } else {
                    format!("`{face} = \"...\"`")
                };
                self.problem(format!(
                    "{label}: no material given; add {hint}, or list it in box.omit for an open model"
                ));
                self.incomplete = true;
                continue;
            };
            let index = self.material_index(names, material, &label);
            raw.push(RawSurface {
                label,
                material: index,
                vertices: vertices.to_vec(),
                group: face.to_string(),
                profile_axis: bx.profile_axes.get(face).map(point),
                axis_from: None,
            });
        }
    }

    /// The faces of `[mesh]`, each mapped to a material by its OBJ material or group name.
    fn mesh(
        &mut self,
        mesh: &MeshFile,
        dir: &Path,
        names: &BTreeMap<String, usize>,
        raw: &mut Vec<RawSurface>,
    ) {
        let path = dir.join(&mesh.file);
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) => {
                self.problem(format!(
                    "mesh.file: cannot read the OBJ file {}: {e}",
                    path.display()
                ));
                self.incomplete = true;
                return;
            }
        };
        let parsed = match obj::parse_obj(&text) {
            Ok(m) => m,
            Err(errors) => {
                for e in errors.iter().take(LIST_LIMIT) {
                    self.problem(format!("mesh file {}, {e}", path.display()));
                }
                if errors.len() > LIST_LIMIT {
                    self.problem(format!(
                        "mesh file {}: {} more problems not listed",
                        path.display(),
                        errors.len() - LIST_LIMIT
                    ));
                }
                self.incomplete = true;
                return;
            }
        };
        if parsed.faces.is_empty() {
            self.problem(format!(
                "mesh file {}: holds no faces (`f`)",
                path.display()
            ));
        }
        // Room materials the mapping points at, checked once per entry.
        let mut mapped: BTreeMap<&str, Option<usize>> = BTreeMap::new();
        for (key, material) in &mesh.materials {
            let index = self.material_index(names, material, &format!("mesh.materials.{key}"));
            mapped.insert(key.as_str(), index);
        }
        let mut used_keys: BTreeSet<&str> = BTreeSet::new();
        let mut axis_keys_used: BTreeSet<String> = BTreeSet::new();
        let mut unmapped: BTreeMap<String, usize> = BTreeMap::new();
        for (k, face) in parsed.faces.iter().enumerate() {
            let candidates = [face.material.as_deref(), face.group.as_deref()];
            let key = candidates
                .into_iter()
                .flatten()
                .find(|n| mapped.contains_key(n));
            let group = face
                .group
                .clone()
                .or_else(|| face.object.clone())
                .or_else(|| face.material.clone())
                .unwrap_or_else(|| "mesh".into());
            let label = format!("mesh face {} (line {}, group {group})", k + 1, face.line);
            let material = match key {
                Some(key) => {
                    used_keys.insert(key);
                    mapped[key]
                }
                None => {
                    let name = face
                        .material
                        .clone()
                        .or_else(|| face.group.clone())
                        .unwrap_or_default();
                    unmapped.entry(name).or_insert(face.line);
                    None
                }
            };
            let axis_key = candidates
                .into_iter()
                .flatten()
                .find(|n| mesh.profile_axes.contains_key(*n));
            if let Some(k) = axis_key {
                axis_keys_used.insert(k.to_string());
            }
            raw.push(RawSurface {
                label,
                material,
                vertices: face.vertices.iter().map(|&i| parsed.vertices[i]).collect(),
                group,
                profile_axis: axis_key.map(|k| point(&mesh.profile_axes[k])),
                axis_from: axis_key.map(|k| format!("mesh.profile_axes.{k}")),
            });
        }
        for key in mesh.profile_axes.keys() {
            if !axis_keys_used.contains(key) {
                self.problem(format!(
                    "mesh.profile_axes.{key}: no face of {} has usemtl or group `{key}`",
                    mesh.file
                ));
            }
        }
        for (name, line) in unmapped {
            if name.is_empty() {
                self.problem(format!(
                    "mesh file {}, line {line}: faces without usemtl or g name cannot be given a material; add `usemtl NAME` before them and map NAME in [mesh].materials",
                    path.display()
                ));
            } else {
                self.problem(format!(
                    "mesh.materials: OBJ name `{name}` (first used by a face on line {line} of {}) is not mapped; add `{name} = \"MATERIAL\"` to [mesh].materials",
                    path.display()
                ));
            }
        }
        for key in mapped.keys() {
            if !used_keys.contains(key) {
                self.warn(format!(
                    "mesh.materials.{key}: no face of {} uses this name",
                    path.display()
                ));
            }
        }
    }

    /// Polygon checks, closedness, orientation and triangulation.
    fn geometry(&mut self, raw: Vec<RawSurface>, open: bool) -> (Vec<Surface>, Vec<Triangle>) {
        let mut valid = true;
        for s in &raw {
            valid &= self.check_polygon(s);
        }
        if !valid || raw.is_empty() || self.incomplete {
            return (Vec::new(), Vec::new());
        }

        let polygons: Vec<Vec<DVec3>> = raw.iter().map(|s| s.vertices.clone()).collect();
        let topo = topology::analyse(&polygons);
        self.closed = topo.is_closed();
        let label = |i: usize| raw[i].label.clone();

        if !topo.bad_edges.is_empty() && !open {
            for e in topo.bad_edges.iter().take(LIST_LIMIT) {
                let ends = format!("{}–{}", fmt_point(e.ends[0]), fmt_point(e.ends[1]));
                let users: Vec<String> = e.polygons.iter().map(|&p| label(p)).collect();
                if e.polygons.len() == 1 {
                    self.problem(format!(
                        "room not closed: edge {ends} of {} is not shared with any other surface; close the gap, or set settings.open = true for an open model",
                        users[0]
                    ));
                } else {
                    self.problem(format!(
                        "edge {ends} is shared by {} surfaces ({}); an edge of a closed room joins exactly two (remove overlapping or duplicate surfaces)",
                        users.len(),
                        users.join(", ")
                    ));
                }
            }
            if topo.bad_edges.len() > LIST_LIMIT {
                self.problem(format!(
                    "room not closed: {} more open or overused edges not listed",
                    topo.bad_edges.len() - LIST_LIMIT
                ));
            }
        }
        if open && !topo.is_closed() {
            self.warn(format!(
                "settings.open: the model has {} open edge(s); its volume by the divergence theorem, and the mean free path and reverberation estimates built on it, are only indicative",
                topo.bad_edges.len()
            ));
        }
        if open && topo.is_closed() {
            self.warn("settings.open is true but the room is closed; rays cannot leave it".into());
        }
        if !topo.non_orientable.is_empty() {
            self.problem(format!(
                "{} closed part(s) of the room are one-sided (their surfaces cannot all face the same side, like a Möbius strip); check how the surfaces meet",
                topo.non_orientable.len()
            ));
        }
        for d in topo.disagreements.iter().take(LIST_LIMIT) {
            self.problem(format!(
                "{} and {} run the same way along their shared edge {}–{}, so one of them faces out of the room; reverse the vertex order of one (normals must point into the room)",
                label(d.polygons[0]),
                label(d.polygons[1]),
                fmt_point(d.ends[0]),
                fmt_point(d.ends[1])
            ));
        }
        if topo.disagreements.len() > LIST_LIMIT {
            self.problem(format!(
                "{} more orientation disagreements not listed",
                topo.disagreements.len() - LIST_LIMIT
            ));
        }
        if !topo.reverse.is_empty() {
            let names: Vec<String> = topo.reverse.iter().map(|&i| label(i)).collect();
            self.warn(format!(
                "normals of {} surface(s) pointed out of the room and were reversed (the room is closed, so the inside is unambiguous): {}",
                names.len(),
                list_names(&names)
            ));
        }

        let reverse: BTreeSet<usize> = topo.reverse.iter().copied().collect();
        let mut surfaces = Vec::with_capacity(raw.len());
        // Shared axes (mesh.profile_axes): faces out of plane, faces in all.
        let mut shared_axis_faces: BTreeMap<String, (usize, usize, bool)> = BTreeMap::new();
        let mut triangles = Vec::new();
        for (i, s) in raw.into_iter().enumerate() {
            let mut vertices = s.vertices;
            if reverse.contains(&i) {
                vertices.reverse();
            }
            let normal = polygon::newell_vector(&vertices).normalize();
            let Ok(tris) = polygon::triangulate(&vertices) else {
                continue; // already reported by check_polygon
            };
            let index = surfaces.len() as u32;
            triangles.extend(tris.iter().map(|t| Triangle {
                vertices: [vertices[t[0]], vertices[t[1]], vertices[t[2]]],
                surface: index,
            }));
            let profile_axis = s.profile_axis.and_then(|a| {
                let axis = a.try_normalize();
                let out_of_plane = axis.is_some_and(|u| u.dot(normal).abs() > 0.01);
                match (&s.axis_from, axis) {
                    (Some(from), _) => {
                        let counts = shared_axis_faces.entry(from.clone()).or_default();
                        counts.0 += usize::from(out_of_plane);
                        counts.1 += 1;
                        counts.2 |= axis.is_none();
                    }
                    (None, None) => self.problem(format!(
                        "{}: profile_axis must be a non-zero direction",
                        s.label
                    )),
                    (None, Some(_)) if out_of_plane => self.warn(format!(
                        "{}: profile_axis is not in the surface's plane; its projection is used",
                        s.label
                    )),
                    (None, Some(_)) => {}
                }
                axis
            });
            surfaces.push(Surface {
                label: s.label,
                material: s.material.unwrap_or(0),
                area_m2: polygon::area_m2(&vertices),
                vertices,
                normal,
                profile_axis,
                group: s.group,
            });
        }
        for (from, (out_of_plane, faces, zero)) in shared_axis_faces {
            if zero {
                self.problem(format!("{from}: the axis must be a non-zero direction"));
            } else if out_of_plane > 0 {
                self.warn(format!(
                    "{from}: the axis is not in the plane of {out_of_plane} of its {faces} faces; \
                     on those its projection is used"
                ));
            }
        }
        if self.closed && !surfaces.is_empty() {
            let tri_points: Vec<[DVec3; 3]> = triangles.iter().map(|t| t.vertices).collect();
            let volume = topology::signed_volume_m3(&tri_points);
            if volume <= 0.0 {
                self.problem(format!(
                    "the room encloses no volume ({volume:.3} m³) with its normals pointing inward; check the vertex order of the surfaces"
                ));
            }
        }
        (surfaces, triangles)
    }

    /// Vertex count, finiteness, repeated vertices, area, planarity and
    /// triangulation of one polygon; true if it is usable.
    fn check_polygon(&mut self, s: &RawSurface) -> bool {
        let v = &s.vertices;
        if v.len() < 3 {
            self.problem(format!(
                "{}: a polygon needs at least 3 vertices, found {}",
                s.label,
                v.len()
            ));
            return false;
        }
        if let Some(i) = v.iter().position(|p| !finite(*p)) {
            self.problem(format!("{}: vertex {} is not finite", s.label, i + 1));
            return false;
        }
        for i in 0..v.len() {
            for j in (i + 1)..v.len() {
                if v[i].distance(v[j]) <= topology::WELD_TOLERANCE_M {
                    self.problem(format!(
                        "{}: vertices {} and {} are the same point {}; a polygon visits each corner once",
                        s.label,
                        i + 1,
                        j + 1,
                        fmt_point(v[i])
                    ));
                    return false;
                }
            }
        }
        let area = polygon::area_m2(v);
        if area < polygon::MIN_AREA_M2 {
            self.problem(format!(
                "{}: zero area ({area:.2e} m²): its vertices lie on one line",
                s.label
            ));
            return false;
        }
        let deviation = polygon::plane_deviation_m(v).unwrap_or(0.0);
        if deviation > polygon::PLANARITY_TOLERANCE_M {
            self.problem(format!(
                "{}: not planar: a vertex lies {deviation:.4} m from the polygon's plane (tolerance {} m); split it into planar pieces",
                s.label,
                polygon::PLANARITY_TOLERANCE_M
            ));
            return false;
        }
        if let Err(e) = polygon::triangulate(v) {
            self.problem(format!("{}: {e}", s.label));
            return false;
        }
        true
    }

    fn sources(&mut self, file: &RoomFile, scene: &Scene<'_>) -> Vec<Source> {
        if file.sources.is_empty() {
            self.problem(
                "the room has no sources: add a [[sources]] table with name and position".into(),
            );
        }
        let mut names = BTreeSet::new();
        let mut out = Vec::new();
        for (i, s) in file.sources.iter().enumerate() {
            let item = format!("sources[{i}] ({})", s.name);
            if !names.insert(s.name.clone()) {
                self.problem(format!("{item}: another source has the same name"));
            }
            let p = point(&s.position);
            if !finite(p) {
                self.problem(format!("{item}: position must be finite"));
                continue;
            }
            self.place(&item, p, MIN_SOURCE_CLEARANCE_M, None, scene);
            out.push(Source {
                name: s.name.clone(),
                position: p,
            });
        }
        out
    }

    fn receivers(&mut self, file: &RoomFile, scene: &Scene<'_>) -> Vec<Receiver> {
        if file.receivers.is_empty() {
            self.problem(
                "the room has no receivers: add a [[receivers]] table with name and position"
                    .into(),
            );
        }
        let mut names = BTreeSet::new();
        let mut out = Vec::new();
        for (i, r) in file.receivers.iter().enumerate() {
            let item = format!("receivers[{i}] ({})", r.name);
            if !names.insert(r.name.clone()) {
                self.problem(format!("{item}: another receiver has the same name"));
            }
            let p = point(&r.position);
            if !finite(p) {
                self.problem(format!("{item}: position must be finite"));
                continue;
            }
            let radius = r.radius_m.map(|x| x.0);
            if let Some(rad) = radius {
                if !(rad.is_finite() && rad > 0.0) {
                    self.problem(format!(
                        "{item}: radius_m must be a positive number of metres, found {rad}"
                    ));
                }
            }
            let clearance = radius.filter(|r| r.is_finite() && *r > 0.0);
            self.place(
                &item,
                p,
                clearance.unwrap_or(MIN_SOURCE_CLEARANCE_M),
                clearance,
                scene,
            );
            out.push(Receiver {
                name: r.name.clone(),
                position: p,
                radius_m: radius,
            });
        }
        out
    }

    /// Checks that a point lies in the room, at least `clearance_m` from every
    /// surface. `radius_m` is the receiver radius the clearance came from, if any.
    fn place(
        &mut self,
        item: &str,
        p: DVec3,
        clearance_m: f64,
        radius_m: Option<f64>,
        scene: &Scene<'_>,
    ) {
        let (tris, closed, open) = (&scene.points, scene.closed, scene.open);
        if tris.is_empty() {
            return;
        }
        if closed && !inside::is_inside_room(p, tris) {
            self.problem(format!(
                "{item}: position {} is outside the room",
                fmt_point(p)
            ));
            return;
        }
        if !closed && open {
            // No inside to test against: see which side of the surfaces it faces.
            let (mut front, mut back) = (0usize, 0usize);
            for d in inside::probe_directions(PROBE_RAYS) {
                if let Some((_, t)) = inside::first_hit(p, d, tris) {
                    let t = &tris[t];
                    if (t[1] - t[0]).cross(t[2] - t[0]).dot(d) < 0.0 {
                        front += 1;
                    } else {
                        back += 1;
                    }
                }
            }
            if back > front {
                self.problem(format!(
                    "{item}: most surfaces seen from {} face away from it: it is outside the model, or the normals point out of the room (reverse every surface's vertex order)",
                    fmt_point(p)
                ));
                return;
            }
        }
        let (nearest, distance) = nearest_surface(p, tris);
        if distance < clearance_m {
            let surface = &scene.surfaces[scene.triangles[nearest].surface as usize].label;
            match radius_m {
                Some(r) => self.problem(format!(
                    "{item}: its sphere of radius {r} m reaches {surface} ({distance:.3} m from the centre); move it or give a smaller radius_m"
                )),
                None => self.problem(format!(
                    "{item}: lies on {surface} ({distance:.4} m away, less than {clearance_m} m); move it into the room"
                )),
            }
        }
    }
}

/// Index of the triangle nearest to `p` and the distance, m.
fn nearest_surface(p: DVec3, tris: &[[DVec3; 3]]) -> (usize, f64) {
    let mut best = (0usize, f64::INFINITY);
    for (i, t) in tris.iter().enumerate() {
        let d = inside::distance_to_triangle_m(p, t);
        if d < best.1 {
            best = (i, d);
        }
    }
    best
}
