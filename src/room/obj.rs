//! A small Wavefront OBJ reader: vertices (`v`), faces (`f`, with the `v`,
//! `v/vt`, `v//vn` and `v/vt/vn` forms and negative, relative indices),
//! materials (`usemtl`), groups (`g`) and objects (`o`). Every error names
//! the line it was found on. Texture coordinates, normals, `mtllib`, `s` and
//! other statements are accepted and ignored: polaray needs only the shape
//! and the names that map faces to materials.

use glam::DVec3;

/// One face of an OBJ file.
#[derive(Clone, Debug, PartialEq)]
pub struct ObjFace {
    /// Indices into [`ObjMesh::vertices`] (zero-based, already resolved).
    pub vertices: Vec<usize>,
    /// Line of the `f` statement, 1-based.
    pub line: usize,
    /// Name of the last `usemtl` before the face, if any.
    pub material: Option<String>,
    /// Name of the last `g` before the face, if any (several names joined by a space).
    pub group: Option<String>,
    /// Name of the last `o` before the face, if any.
    pub object: Option<String>,
}

/// The geometry of an OBJ file.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ObjMesh {
    /// Vertex positions in file order, in the file's units (polaray reads metres).
    pub vertices: Vec<DVec3>,
    /// Faces in file order.
    pub faces: Vec<ObjFace>,
}

/// A problem in an OBJ file, with its line.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("line {line}: {message}")]
pub struct ObjError {
    /// Line, 1-based.
    pub line: usize,
    /// What is wrong and how to fix it.
    pub message: String,
}

/// Parses OBJ text, collecting every problem found (not just the first).
pub fn parse_obj(text: &str) -> Result<ObjMesh, Vec<ObjError>> {
    let mut mesh = ObjMesh::default();
    let mut errors = Vec::new();
    let mut material: Option<String> = None;
    let mut group: Option<String> = None;
    let mut object: Option<String> = None;

    for (index, raw) in text.lines().enumerate() {
        let line = index + 1;
        let content = raw.split('#').next().unwrap_or("").trim();
        if content.is_empty() {
            continue;
        }
        let mut words = content.split_whitespace();
        let keyword = words.next().unwrap_or("");
        let rest: Vec<&str> = words.collect();
        let mut fail = |message: String| errors.push(ObjError { line, message });
        match keyword {
            "v" => match parse_vertex(&rest) {
                Ok(p) => mesh.vertices.push(p),
                Err(m) => fail(m),
            },
            "f" => match parse_face(&rest, mesh.vertices.len()) {
                Ok(vertices) => mesh.faces.push(ObjFace {
                    vertices,
                    line,
                    material: material.clone(),
                    group: group.clone(),
                    object: object.clone(),
                }),
                Err(m) => fail(m),
            },
            "usemtl" => match name_of(&rest) {
                Some(n) => material = Some(n),
                None => fail("`usemtl` needs a material name".into()),
            },
            "g" => group = name_of(&rest),
            "o" => match name_of(&rest) {
                Some(n) => object = Some(n),
                None => fail("`o` needs an object name".into()),
            },
            // Accepted and not needed: texture coordinates, normals, parameter
            // vertices, smoothing groups, material libraries, lines and points.
            "vt" | "vn" | "vp" | "s" | "mtllib" | "l" | "p" => {}
            other => fail(format!(
                "unknown statement `{other}`; polaray reads v, f, usemtl, g and o"
            )),
        }
    }
    if errors.is_empty() {
        Ok(mesh)
    } else {
        Err(errors)
    }
}

/// The name after `usemtl`, `g` or `o`: the words joined by one space.
fn name_of(words: &[&str]) -> Option<String> {
    if words.is_empty() {
        None
    } else {
        Some(words.join(" "))
    }
}

/// `v x y z [w]`.
fn parse_vertex(words: &[&str]) -> Result<DVec3, String> {
    if words.len() < 3 || words.len() > 4 {
        return Err(format!(
            "a vertex needs 3 coordinates (`v x y z`), found {}",
            words.len()
        ));
    }
    let mut c = [0.0; 3];
    for (slot, word) in c.iter_mut().zip(words) {
        *slot = word
            .parse::<f64>()
            .ok()
            .filter(|x| x.is_finite())
            .ok_or_else(|| format!("vertex coordinate `{word}` is not a finite number"))?;
    }
    Ok(DVec3::from_array(c))
}

/// `f a b c ...` where each corner is `v`, `v/vt`, `v//vn` or `v/vt/vn`;
/// indices are 1-based, negative ones count back from the latest vertex.
fn parse_face(words: &[&str], vertex_count: usize) -> Result<Vec<usize>, String> {
    if words.len() < 3 {
        return Err(format!(
            "a face needs at least 3 corners, found {}",
            words.len()
        ));
    }
    words
        .iter()
        .map(|word| {
            let first = word.split('/').next().unwrap_or("");
            let index: i64 = first
                .parse()
                .map_err(|_| format!("face corner `{word}` does not start with a vertex index"))?;
            resolve_index(index, vertex_count).ok_or_else(|| {
                format!(
                    "face corner `{word}` refers to vertex {index}, but {vertex_count} vertices are defined so far"
                )
            })
        })
        .collect()
}

/// Resolves a 1-based or negative (relative) OBJ index to a zero-based one.
fn resolve_index(index: i64, vertex_count: usize) -> Option<usize> {
    let count = i64::try_from(vertex_count).ok()?;
    let resolved = if index > 0 {
        index - 1
    } else if index < 0 {
        count + index
    } else {
        return None;
    };
    (0..count).contains(&resolved).then_some(resolved as usize)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_all_corner_forms_and_negative_indices() {
        let text = "\
# a unit square and a triangle
o thing
v 0 0 0
v 1 0 0
v 1 1 0
v 0 1 0
vt 0 0
vn 0 0 1
usemtl Wall
g Left Side
f 1 2 3 4
f 1/1 2/1 3/1
f 1//1 2//1 3//1
f 1/1/1 2/1/1 3/1/1
f -4 -3 -2
";
        let mesh = parse_obj(text).expect("valid OBJ");
        assert_eq!(mesh.vertices.len(), 4);
        assert_eq!(mesh.faces.len(), 5);
        assert_eq!(mesh.faces[0].vertices, vec![0, 1, 2, 3]);
        for f in &mesh.faces[1..] {
            assert_eq!(f.vertices, vec![0, 1, 2]);
        }
        assert_eq!(mesh.faces[0].line, 11);
        assert_eq!(mesh.faces[0].material.as_deref(), Some("Wall"));
        assert_eq!(mesh.faces[0].group.as_deref(), Some("Left Side"));
        assert_eq!(mesh.faces[0].object.as_deref(), Some("thing"));
    }

    #[test]
    fn collects_errors_with_line_numbers() {
        let text = "v 0 0\nv 0 0 0\nv 1 0 0\nf 1 2 9\nf 1 2\nbogus 1\nv 1 x 0\nf 0 1 2\n";
        let errors = parse_obj(text).unwrap_err();
        let lines: Vec<usize> = errors.iter().map(|e| e.line).collect();
        assert_eq!(lines, vec![1, 4, 5, 6, 7, 8]);
        assert!(errors[1].message.contains("vertex 9"), "{}", errors[1]);
    }
}
