//! The library's folders depend one way only, and no file depends on itself through others.
//!
//! The rule (DEVELOPERS.md, "Architecture"; docs/ARCHITECTURE.md): geometry and draw at the
//! bottom, then shading, scene, pipeline and analysis; `web.rs` on top. The native command
//! line is the binary (`src/main.rs`, `src/cli/`) and reaches the library only through its
//! public API (`twinshade::...`), never `crate::`. This test reads every `crate::` path in the
//! code (comments excluded) and fails on an import against the rule or on any cycle between
//! files.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// Each folder with the folders it may use (besides itself).
const LAYERS: &[(&str, &[&str])] = &[
    ("geometry", &[]),
    ("draw", &[]),
    ("shading", &["geometry"]),
    ("scene", &["geometry", "shading"]),
    ("pipeline", &["geometry", "shading", "scene"]),
    (
        "analysis",
        &["geometry", "shading", "scene", "pipeline", "draw"],
    ),
    (
        "web",
        &[
            "geometry", "shading", "scene", "pipeline", "analysis", "draw",
        ],
    ),
];

fn src() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("src")
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(dir).expect("src is readable") {
        let path = entry.expect("entry").path();
        if path.is_dir() {
            rust_files(&path, out);
        } else if path.extension().is_some_and(|e| e == "rs") {
            out.push(path);
        }
    }
}

/// The module path of a file: `src/geometry/import/obj.rs` -> `geometry::import::obj`,
/// `src/scene/mod.rs` -> `scene`, `src/web.rs` -> `web`.
fn module_of(file: &Path) -> String {
    let rel = file.strip_prefix(src()).expect("under src");
    let mut parts: Vec<String> = rel
        .iter()
        .map(|p| p.to_string_lossy().trim_end_matches(".rs").to_string())
        .collect();
    if parts.last().is_some_and(|p| p == "mod") {
        parts.pop();
    }
    parts.join("::")
}

/// The code of a file without `//` comments (doc links are not dependencies).
fn code(text: &str) -> String {
    text.lines()
        .map(|l| match l.find("//") {
            Some(i) if !l[..i].contains('"') => &l[..i],
            _ => l,
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// Every `crate::a::b::...` path in `code`, as its lowercase segments.
fn crate_paths(code: &str) -> Vec<Vec<String>> {
    let mut out = Vec::new();
    let mut rest = code;
    while let Some(i) = rest.find("crate::") {
        let before = rest[..i].chars().last();
        rest = &rest[i + "crate::".len()..];
        if before.is_some_and(|c| c.is_alphanumeric() || c == '_') {
            continue; // e.g. `twinshade_crate::`
        }
        let mut segs = Vec::new();
        for s in rest.split("::") {
            let name: String = s
                .chars()
                .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
                .collect();
            let ended = name.len() < s.len();
            if !name.is_empty() {
                segs.push(name);
            }
            if ended || segs.is_empty() {
                break; // the path ends inside this segment
            }
        }
        out.push(segs);
    }
    out
}

struct Crate {
    /// Module path -> (folder, the modules it uses).
    modules: BTreeMap<String, BTreeSet<String>>,
    problems: Vec<String>,
}

fn read_crate() -> Crate {
    let mut files = Vec::new();
    rust_files(&src(), &mut files);
    files.sort();
    let known: BTreeSet<String> = files.iter().map(|f| module_of(f)).collect();
    let mut modules = BTreeMap::new();
    let mut problems = Vec::new();
    for file in &files {
        let module = module_of(file);
        let text = std::fs::read_to_string(file).expect("readable source");
        let code = code(&text);
        if module == "main" || module.starts_with("cli") {
            if code.contains("crate::") {
                problems.push(format!(
                    "{module}: the command line is the binary and uses `twinshade::`, not `crate::`"
                ));
            }
            continue;
        }
        if code.contains("crate::{") {
            problems.push(format!("{module}: name one module path per `use crate::`"));
        }
        let mut uses = BTreeSet::new();
        for segs in crate_paths(&code) {
            // The longest prefix of the path that is a file of the crate.
            let target = (1..=segs.len())
                .rev()
                .map(|n| segs[..n].join("::"))
                .find(|m| known.contains(m));
            match target {
                Some(t) if t.contains("::") || t == "web" => {
                    if t != module {
                        uses.insert(t);
                    }
                }
                Some(t) => problems.push(format!(
                    "{module}: `crate::{}` goes through the folder `{t}`'s re-exports; name the file",
                    segs.join("::")
                )),
                None => problems.push(format!(
                    "{module}: `crate::{}` names no module file",
                    segs.join("::")
                )),
            }
        }
        modules.insert(module, uses);
    }
    Crate { modules, problems }
}

fn folder(module: &str) -> &str {
    module.split("::").next().unwrap_or(module)
}

#[test]
fn folders_depend_one_way() {
    let krate = read_crate();
    assert!(
        krate.modules.len() > 30,
        "read only {} modules",
        krate.modules.len()
    );
    let allowed: BTreeMap<&str, &[&str]> = LAYERS.iter().copied().collect();
    let mut problems = krate.problems.clone();
    let mut edges = 0;
    for (module, uses) in &krate.modules {
        let from = folder(module);
        let Some(may) = allowed.get(from) else {
            if module != "lib" {
                problems.push(format!("{module}: not in a folder of the rule"));
            }
            continue;
        };
        for used in uses {
            edges += 1;
            let to = folder(used);
            if to != from && !may.contains(&to) {
                problems.push(format!("{module} uses {used}: {from} may use only {may:?}"));
            }
        }
    }
    // The graph is real: the pipeline's renderer uses the rasterizer, the scene its settings.
    assert!(
        edges > 60,
        "only {edges} imports found: the parser is broken"
    );
    assert!(krate.modules["pipeline::render"].contains("pipeline::raster"));
    assert!(krate.modules["scene::definition"].contains("scene::settings"));
    assert!(problems.is_empty(), "{}", problems.join("\n"));
}

#[test]
fn no_file_depends_on_itself() {
    let krate = read_crate();
    // Depth-first search with colours; a grey node reached again closes a cycle.
    fn visit(
        m: &str,
        graph: &BTreeMap<String, BTreeSet<String>>,
        state: &mut BTreeMap<String, u8>,
        stack: &mut Vec<String>,
        cycles: &mut Vec<String>,
    ) {
        state.insert(m.to_string(), 1);
        stack.push(m.to_string());
        for next in graph.get(m).into_iter().flatten() {
            match state.get(next.as_str()).copied().unwrap_or(0) {
                0 => visit(next, graph, state, stack, cycles),
                1 => {
                    let at = stack.iter().position(|s| s == next).unwrap_or(0);
                    let mut cycle = stack[at..].to_vec();
                    cycle.push(next.clone());
                    cycles.push(cycle.join(" -> "));
                }
                _ => {}
            }
        }
        stack.pop();
        state.insert(m.to_string(), 2);
    }
    let mut state = BTreeMap::new();
    let mut cycles = Vec::new();
    for m in krate.modules.keys() {
        if state.get(m.as_str()).copied().unwrap_or(0) == 0 {
            visit(m, &krate.modules, &mut state, &mut Vec::new(), &mut cycles);
        }
    }
    assert!(cycles.is_empty(), "import cycles:\n{}", cycles.join("\n"));
}

#[test]
fn the_checker_sees_a_cycle_and_a_wrong_way_import() {
    // The parser on made-up code: both kinds of path, a grouped import, comments skipped.
    let code = code(
        "use crate::scene::definition::Scene;\n// crate::analysis::sweep is only mentioned\nlet x = crate::geometry::subdivide::subdivide(&m);",
    );
    let paths = crate_paths(&code);
    assert_eq!(
        paths,
        vec![
            vec!["scene", "definition", "Scene"],
            vec!["geometry", "subdivide", "subdivide"]
        ]
    );
}
