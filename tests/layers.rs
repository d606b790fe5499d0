//! The layers of the source tree, checked from the source itself: no file imports a layer above
//! its own, and no two files import each other, directly or round a longer loop.
//!
//! Layers, lowest first (DEVELOPERS.md): the foundation (`error`, `numfmt`, `precision`,
//! `random`, `small_sort`), `optics`, `contract`, `design`, `view`, `web`. A `crate::…` path in a
//! file names the module it uses (comments and doc links do not count); test modules count too, so a test cannot smuggle in an upward arrow.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

const FOUNDATION: [&str; 5] = ["error", "numfmt", "precision", "random", "small_sort"];
const LAYERS: [&str; 5] = ["optics", "contract", "design", "view", "web"];

fn rank(top: &str) -> Option<usize> {
    if FOUNDATION.contains(&top) {
        Some(0)
    } else {
        LAYERS.iter().position(|l| *l == top).map(|i| i + 1)
    }
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(dir).unwrap() {
        let p = entry.unwrap().path();
        if p.is_dir() {
            if p.file_name().unwrap() != "bin" {
                rust_files(&p, out);
            }
        } else if p.extension().is_some_and(|e| e == "rs") {
            out.push(p);
        }
    }
}

/// The module path of a source file: `src/optics/trace.rs` → `optics::trace`,
/// `src/view/mod.rs` → `view`.
fn module_of(src: &Path, file: &Path) -> String {
    let rel = file.strip_prefix(src).unwrap().with_extension("");
    let parts: Vec<String> = rel.iter().map(|s| s.to_string_lossy().into_owned()).collect();
    let parts: Vec<&str> = parts.iter().map(String::as_str).filter(|p| *p != "mod").collect();
    parts.join("::")
}

/// Every module a file names with a `crate::a::b` path (the longest prefix that is a module).
fn uses(text: &str, modules: &BTreeSet<String>) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    for (i, _) in text.match_indices("crate::") {
        let rest = &text[i + 7..];
        let path: String = rest
            .chars()
            .take_while(|c| c.is_alphanumeric() || *c == '_' || *c == ':')
            .collect();
        let segs: Vec<&str> = path.split("::").filter(|s| !s.is_empty()).collect();
        for n in (1..=segs.len()).rev() {
            let m = segs[..n].join("::");
            if modules.contains(&m) {
                out.insert(m);
                break;
            }
        }
    }
    out
}

#[test]
fn no_layer_imports_one_above_it_and_no_module_loop() {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    rust_files(&src, &mut files);
    let modules: BTreeSet<String> = files.iter().map(|f| module_of(&src, f)).collect();
    let mut graph: BTreeMap<String, BTreeSet<String>> = BTreeMap::new();
    let mut upward = Vec::new();
    for f in &files {
        let me = module_of(&src, f);
        if me == "lib" {
            continue;
        }
        let top = me.split("::").next().unwrap().to_string();
        let my_rank = rank(&top).unwrap_or_else(|| panic!("{me}: not in any layer"));
        // Doc links and comments name modules without using them.
        let text: String = std::fs::read_to_string(f)
            .unwrap()
            .lines()
            .filter(|l| !l.trim_start().starts_with("//"))
            .collect::<Vec<_>>()
            .join("\n");
        for used in uses(&text, &modules) {
            let used_top = used.split("::").next().unwrap();
            if let Some(r) = rank(used_top)
                && r > my_rank
            {
                upward.push(format!("{me} → {used}"));
            }
            // A folder's mod.rs declares its children; that is ownership, not use.
            if used != me && !used.starts_with(&format!("{me}::")) {
                graph.entry(me.clone()).or_default().insert(used);
            }
        }
    }
    assert!(upward.is_empty(), "imports of a layer above: {upward:#?}");

    // Depth-first search for a loop.
    fn visit(
        m: &str,
        graph: &BTreeMap<String, BTreeSet<String>>,
        state: &mut BTreeMap<String, u8>,
        stack: &mut Vec<String>,
    ) -> Option<Vec<String>> {
        match state.get(m) {
            Some(2) => return None,
            Some(1) => {
                let at = stack.iter().position(|s| s == m).unwrap();
                let mut cycle = stack[at..].to_vec();
                cycle.push(m.to_string());
                return Some(cycle);
            }
            _ => {}
        }
        state.insert(m.to_string(), 1);
        stack.push(m.to_string());
        for n in graph.get(m).into_iter().flatten() {
            if let Some(c) = visit(n, graph, state, stack) {
                return Some(c);
            }
        }
        stack.pop();
        state.insert(m.to_string(), 2);
        None
    }
    let mut state = BTreeMap::new();
    for m in graph.keys() {
        let found = visit(m, &graph, &mut state, &mut Vec::new());
        assert!(found.is_none(), "modules in a loop: {}", found.unwrap().join(" → "));
    }
}
