//! The crate's layout rules, checked on its own source: the import graph between
//! modules has no cycle, the two instruments never import each other, and no
//! module imports from a layer above its own.
//!
//! Layers, bottom up: the numeric core (`scalar`, `error`), shared helpers
//! (`rng`), the physics (`optics`, `media`), the instruments (`refractometer`,
//! `autofocus`). `cargo test --test layout` prints the graph's edges between
//! folders when run with `-- --nocapture`.

use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

/// Layer of a top-level module, and whether it is an instrument.
fn layer(top: &str) -> Option<(u8, &'static str)> {
    Some(match top {
        "scalar" | "error" => (0, "numeric core"),
        "rng" => (1, "shared helpers"),
        "optics" | "media" => (2, "physics"),
        "refractometer" | "autofocus" => (3, "instrument"),
        _ => return None,
    })
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let mut entries: Vec<_> = fs::read_dir(dir)
        .expect("src readable")
        .map(|e| e.expect("entry").path())
        .collect();
    entries.sort();
    for p in entries {
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|e| e == "rs") {
            out.push(p);
        }
    }
}

/// `src/a/b.rs` → `a::b`, `src/a/mod.rs` → `a`, `src/lib.rs` → `` (the root).
fn module_of(src: &Path, file: &Path) -> String {
    let rel = file
        .strip_prefix(src)
        .expect("under src")
        .with_extension("");
    let mut parts: Vec<String> = rel
        .components()
        .map(|c| c.as_os_str().to_string_lossy().into_owned())
        .collect();
    if matches!(parts.last().map(String::as_str), Some("mod" | "lib")) {
        parts.pop();
    }
    parts.join("::")
}

/// Code of a line without its comment (doc links are not imports).
fn code_part(line: &str) -> &str {
    let t = line.trim_start();
    if t.starts_with("//") {
        return "";
    }
    match line.find(" //") {
        Some(i) if !line[..i].contains('"') => &line[..i],
        _ => line,
    }
}

/// Parses a use-tree or path after `crate::` / `super::` starting at `s`, pushing
/// every full path it names (`a::{b::C, d}` gives `a::b::C` and `a::d`).
fn paths_of_tree(s: &[u8], mut i: usize, prefix: &str, out: &mut Vec<String>) -> usize {
    let mut path = String::from(prefix);
    loop {
        while i < s.len() && s[i].is_ascii_whitespace() {
            i += 1;
        }
        if i < s.len() && s[i] == b'{' {
            i += 1;
            loop {
                while i < s.len() && (s[i].is_ascii_whitespace() || s[i] == b',') {
                    i += 1;
                }
                if i >= s.len() || s[i] == b'}' {
                    return i + 1;
                }
                i = paths_of_tree(s, i, &path, out);
            }
        }
        let start = i;
        while i < s.len() && (s[i].is_ascii_alphanumeric() || s[i] == b'_') {
            i += 1;
        }
        if start == i {
            out.push(path);
            return i;
        }
        if !path.is_empty() {
            path.push_str("::");
        }
        path.push_str(std::str::from_utf8(&s[start..i]).expect("ascii"));
        if s.get(i..i + 2) == Some(b"::") {
            i += 2;
        } else {
            out.push(path);
            return i;
        }
    }
}

/// Longest module that is a prefix of `path`.
fn resolve(path: &str, modules: &BTreeSet<String>) -> Option<String> {
    let parts: Vec<&str> = path.split("::").collect();
    (1..=parts.len())
        .rev()
        .map(|n| parts[..n].join("::"))
        .find(|m| modules.contains(m))
}

fn import_graph() -> BTreeMap<String, BTreeSet<String>> {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    rust_files(&src, &mut files);
    let modules: BTreeSet<String> = files.iter().map(|f| module_of(&src, f)).collect();
    let mut graph = BTreeMap::new();
    for file in &files {
        let me = module_of(&src, file);
        let text = fs::read_to_string(file).expect("source readable");
        let code: String = text.lines().map(code_part).collect::<Vec<_>>().join("\n");
        let bytes = code.as_bytes();
        let mut paths = Vec::new();
        for (kw, base) in [("crate::", String::new()), ("super::", parent_of(&me))] {
            let mut from = 0;
            while let Some(k) = code[from..].find(kw) {
                let at = from + k;
                let word_start = at == 0 || !is_ident(bytes[at - 1]);
                from = at + kw.len();
                if word_start && !(at >= 2 && &bytes[at - 2..at] == b"::") {
                    paths_of_tree(bytes, from, &base, &mut paths);
                }
            }
        }
        let targets: BTreeSet<String> = paths
            .iter()
            .filter_map(|p| resolve(p, &modules))
            .filter(|t| *t != me && !t.is_empty())
            .collect();
        graph.insert(me, targets);
    }
    graph
}

fn is_ident(b: u8) -> bool {
    b.is_ascii_alphanumeric() || b == b'_'
}

/// The module `super::` names from a file: the parent of a module file.
fn parent_of(me: &str) -> String {
    match me.rfind("::") {
        Some(i) => me[..i].to_string(),
        None => String::new(),
    }
}

fn top(m: &str) -> &str {
    m.split("::").next().unwrap_or(m)
}

#[test]
fn every_top_level_module_has_a_layer() {
    for m in import_graph().keys().filter(|m| !m.is_empty()) {
        assert!(
            layer(top(m)).is_some(),
            "module `{m}` is in no layer: add it to tests/layout.rs and DEVELOPERS.md"
        );
    }
}

#[test]
fn imports_point_down_or_within_a_folder_and_never_between_instruments() {
    let graph = import_graph();
    let mut folder_edges = BTreeSet::new();
    let mut bad = Vec::new();
    for (from, targets) in &graph {
        if from.is_empty() {
            continue; // lib.rs declares and re-exports; it imports nothing.
        }
        for to in targets {
            let (a, b) = (top(from), top(to));
            if a == b {
                continue;
            }
            folder_edges.insert((a.to_string(), b.to_string()));
            let (la, ka) = layer(a).expect("layered");
            let (lb, _) = layer(b).expect("layered");
            if lb > la || (lb == la && ka == "instrument") {
                bad.push(format!("{from} -> {to}"));
            }
        }
    }
    for (a, b) in &folder_edges {
        println!("{a} -> {b}");
    }
    assert!(bad.is_empty(), "imports against the layout: {bad:?}");
    // The rule is not vacuous: the instruments do use the physics and the core.
    assert!(folder_edges.contains(&("refractometer".into(), "optics".into())));
    assert!(folder_edges.contains(&("autofocus".into(), "optics".into())));
}

#[test]
fn no_two_modules_import_each_other_directly_or_through_others() {
    let graph = import_graph();
    // Depth-first search for a cycle; reports the first one found.
    fn visit(
        m: &str,
        graph: &BTreeMap<String, BTreeSet<String>>,
        state: &mut BTreeMap<String, u8>,
        stack: &mut Vec<String>,
    ) -> Option<Vec<String>> {
        state.insert(m.to_string(), 1);
        stack.push(m.to_string());
        for t in graph.get(m).into_iter().flatten() {
            match state.get(t.as_str()).copied().unwrap_or(0) {
                1 => {
                    let i = stack.iter().position(|s| s == t).expect("on stack");
                    let mut cycle = stack[i..].to_vec();
                    cycle.push(t.clone());
                    return Some(cycle);
                }
                0 => {
                    if let Some(c) = visit(t, graph, state, stack) {
                        return Some(c);
                    }
                }
                _ => {}
            }
        }
        stack.pop();
        state.insert(m.to_string(), 2);
        None
    }
    let mut state = BTreeMap::new();
    let edges: usize = graph.values().map(BTreeSet::len).sum();
    assert!(
        edges > 50,
        "the scan found only {edges} imports: the parser is broken"
    );
    for m in graph.keys() {
        if state.get(m.as_str()).copied().unwrap_or(0) == 0 {
            let cycle = visit(m, &graph, &mut state, &mut Vec::new());
            assert!(
                cycle.is_none(),
                "import cycle: {}",
                cycle.unwrap().join(" -> ")
            );
        }
    }
}

#[test]
fn the_parser_reads_nested_use_trees() {
    let mut out = Vec::new();
    let s = b"refractometer::{boundary::Frame, geometry::{Geometry, check}}, x";
    paths_of_tree(s, 0, "", &mut out);
    assert_eq!(
        out,
        [
            "refractometer::boundary::Frame",
            "refractometer::geometry::Geometry",
            "refractometer::geometry::check"
        ]
    );
}

/// The reading side: what a refractometer firmware links.
const READING_SIDE: &str = "refractometer::reading";

/// What the reading side may import besides itself: the numeric core.
fn reading_side_may_import(to: &str) -> bool {
    to == READING_SIDE
        || to.starts_with("refractometer::reading::")
        || matches!(top(to), "scalar" | "error")
}

#[test]
fn the_reading_side_never_imports_the_model_side() {
    let graph = import_graph();
    let reading: Vec<&String> = graph
        .keys()
        .filter(|m| *m == READING_SIDE || m.starts_with("refractometer::reading::"))
        .collect();
    // Not vacuous: the side exists, with its finder, cells, evaluators and meter.
    for part in [
        "boundary",
        "brix_cells",
        "prepared",
        "meter",
        "record",
        "store",
    ] {
        let m = format!("{READING_SIDE}::{part}");
        assert!(
            graph.contains_key(&m),
            "{m} is missing from the reading side"
        );
    }
    let mut bad = Vec::new();
    for from in reading {
        for to in &graph[from] {
            if !reading_side_may_import(to) {
                bad.push(format!("{from} -> {to}"));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "the reading side imports the model side (the bridge is data, made by refractometer::prepare): {bad:?}"
    );
    // And the bridge is used: the model side's preparation imports both sides.
    let prepare = &graph["refractometer::prepare"];
    assert!(prepare.iter().any(|t| t.starts_with(READING_SIDE)));
    assert!(prepare.iter().any(|t| t == "refractometer::compensation"));
}

#[test]
fn the_reading_side_rule_catches_a_model_import() {
    // The predicate itself: a model module is refused, the core allowed.
    assert!(!reading_side_may_import("refractometer::compensation"));
    assert!(!reading_side_may_import("optics::refraction"));
    assert!(!reading_side_may_import("media::water"));
    assert!(reading_side_may_import("scalar"));
    assert!(reading_side_may_import("refractometer::reading::boundary"));
}
