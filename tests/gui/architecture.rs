//! The window's modules form layers: no module of `src/app/` imports
//! (through `super::`) a module that imports it back, directly or round a
//! longer circle.
use std::collections::BTreeMap;
use std::path::Path;

/// The app modules each module of `src/app/` names through `super::`,
/// outside its tests.
fn imports() -> BTreeMap<String, Vec<String>> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("src/app");
    let mut names = Vec::new();
    for entry in std::fs::read_dir(&dir).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "rs") {
            names.push(path.file_stem().unwrap().to_string_lossy().into_owned());
        }
    }
    let mut out = BTreeMap::new();
    for name in names.iter().filter(|n| *n != "mod") {
        let text = std::fs::read_to_string(dir.join(format!("{name}.rs"))).unwrap();
        let code = text.split("#[cfg(test)]").next().unwrap_or("");
        let mut deps: Vec<String> = names
            .iter()
            .filter(|other| *other != name && *other != "mod")
            .filter(|other| names_module(code, other))
            .cloned()
            .collect();
        deps.sort();
        out.insert(name.clone(), deps);
    }
    out
}

/// Whether `code` names `super::module` (alone or in a `super::{..}`
/// group).
fn names_module(code: &str, module: &str) -> bool {
    let word = |s: &str| {
        s.split(|c: char| !(c.is_alphanumeric() || c == '_'))
            .any(|w| w == module)
    };
    code.match_indices("super::").any(|(at, _)| {
        let rest = &code[at + "super::".len()..];
        match rest.strip_prefix('{') {
            Some(group) => word(group.split('}').next().unwrap_or("")),
            None => {
                rest.split(|c: char| !(c.is_alphanumeric() || c == '_'))
                    .next()
                    == Some(module)
            }
        }
    })
}

/// A circle in `graph`, if there is one.
fn circle(graph: &BTreeMap<String, Vec<String>>) -> Option<Vec<String>> {
    fn visit(
        node: &str,
        graph: &BTreeMap<String, Vec<String>>,
        path: &mut Vec<String>,
        done: &mut Vec<String>,
    ) -> Option<Vec<String>> {
        if let Some(at) = path.iter().position(|n| n == node) {
            let mut c = path[at..].to_vec();
            c.push(node.to_string());
            return Some(c);
        }
        if done.iter().any(|n| n == node) {
            return None;
        }
        path.push(node.to_string());
        for next in graph.get(node).into_iter().flatten() {
            if let Some(c) = visit(next, graph, path, done) {
                return Some(c);
            }
        }
        path.pop();
        done.push(node.to_string());
        None
    }
    let mut done = Vec::new();
    graph
        .keys()
        .find_map(|n| visit(n, graph, &mut Vec::new(), &mut done))
}

#[test]
fn the_window_modules_import_each_other_without_circles() {
    let graph = imports();
    // The check sees imports: the frame uses the canvas and the canvas
    // the state (a broken reader would find nothing and pass).
    assert!(
        graph["explorer"].contains(&"canvas".to_string()),
        "{graph:?}"
    );
    assert!(graph["canvas"].contains(&"state".to_string()), "{graph:?}");
    assert_eq!(circle(&graph), None, "{graph:#?}");
}

/// The modules in the order of the code map in `src/app/mod.rs` (first
/// mention of each).
fn code_map_order(modules: &[String]) -> Vec<String> {
    let text =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("src/app/mod.rs"))
            .unwrap();
    let map = text
        .split("//! Code map")
        .nth(1)
        .and_then(|rest| rest.split("\n//!\n").next())
        .expect("mod.rs has a code map");
    let mut order: Vec<String> = Vec::new();
    for name in map.split('`').skip(1).step_by(2) {
        if modules.iter().any(|m| m == name) && !order.iter().any(|o| o == name) {
            order.push(name.to_string());
        }
    }
    order
}

#[test]
fn every_module_imports_only_modules_above_it_in_the_code_map() {
    let graph = imports();
    let modules: Vec<String> = graph.keys().cloned().collect();
    let order = code_map_order(&modules);
    let missing: Vec<&String> = modules.iter().filter(|m| !order.contains(m)).collect();
    assert!(missing.is_empty(), "not in the code map: {missing:?}");
    let rank = |m: &str| order.iter().position(|o| o == m).unwrap();
    for (module, deps) in &graph {
        for dep in deps {
            assert!(
                rank(dep) < rank(module),
                "{module} imports {dep}, which the code map lists after it"
            );
        }
    }
}

#[test]
fn the_circle_finder_finds_one() {
    let graph: BTreeMap<String, Vec<String>> = [
        ("a", vec!["b"]),
        ("b", vec!["c"]),
        ("c", vec!["a"]),
        ("d", vec![]),
    ]
    .into_iter()
    .map(|(k, v)| (k.to_string(), v.into_iter().map(String::from).collect()))
    .collect();
    assert_eq!(circle(&graph).map(|c| c.len()), Some(4));
    assert!(names_module("use super::{canvas, state};", "state"));
    assert!(!names_module("use super::statement;", "state"));
}
