//! Where a field path (`sections[2].clearance`, `generate.corners`) is written in the YAML text:
//! the file read once more as a tree of keys and items, each with its location. Used for the
//! problems found across fields (an overlap, a generated name, a missing block), so that every
//! message carries a `line:column`: the path's own value, or the nearest enclosing one written.

use serde::de::{Deserialize, Deserializer, MapAccess, SeqAccess, Visitor};
use serde_saphyr::Spanned;
use std::collections::BTreeMap;
use std::fmt;

/// A YAML node with the locations of its children.
#[derive(Debug, Default)]
pub(super) enum Node {
    /// A mapping: key → value.
    Map(BTreeMap<String, Spanned<Node>>),
    /// A sequence.
    Seq(Vec<Spanned<Node>>),
    /// A scalar (or anything else).
    #[default]
    Leaf,
}

impl<'de> Deserialize<'de> for Node {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        struct V;
        impl<'de> Visitor<'de> for V {
            type Value = Node;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("any YAML node")
            }
            fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Node, A::Error> {
                let mut out = BTreeMap::new();
                while let Some(k) = map.next_key::<KeyText>()? {
                    let v: Spanned<Node> = map.next_value()?;
                    out.insert(k.0, v);
                }
                Ok(Node::Map(out))
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Node, A::Error> {
                let mut out = Vec::new();
                while let Some(v) = seq.next_element::<Spanned<Node>>()? {
                    out.push(v);
                }
                Ok(Node::Seq(out))
            }
            fn visit_bool<E>(self, _: bool) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
            fn visit_i64<E>(self, _: i64) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
            fn visit_u64<E>(self, _: u64) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
            fn visit_f64<E>(self, _: f64) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
            fn visit_str<E>(self, _: &str) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
            fn visit_unit<E>(self) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
            fn visit_none<E>(self) -> Result<Node, E> {
                Ok(Node::Leaf)
            }
        }
        deserializer.deserialize_any(V)
    }
}

/// A mapping key as text.
struct KeyText(String);

impl<'de> Deserialize<'de> for KeyText {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        struct V;
        impl Visitor<'_> for V {
            type Value = KeyText;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a key")
            }
            fn visit_str<E>(self, v: &str) -> Result<KeyText, E> {
                Ok(KeyText(v.to_string()))
            }
            fn visit_i64<E>(self, v: i64) -> Result<KeyText, E> {
                Ok(KeyText(v.to_string()))
            }
            fn visit_u64<E>(self, v: u64) -> Result<KeyText, E> {
                Ok(KeyText(v.to_string()))
            }
            fn visit_bool<E>(self, v: bool) -> Result<KeyText, E> {
                Ok(KeyText(v.to_string()))
            }
        }
        deserializer.deserialize_any(V)
    }
}

/// The parts of a field path: keys and list indices (`a.b[2].c` → a, b, 2, c).
enum Part<'a> {
    Key(&'a str),
    Index(usize),
}

fn parts(path: &str) -> Vec<Part<'_>> {
    let mut out = Vec::new();
    for seg in path.split('.') {
        let (key, rest) = seg.split_once('[').map_or((seg, ""), |(k, r)| (k, r));
        if !key.is_empty() {
            out.push(Part::Key(key));
        }
        for idx in rest.split('[') {
            if let Ok(i) = idx.trim_end_matches(']').parse::<usize>() {
                out.push(Part::Index(i));
            }
        }
    }
    out
}

/// The 1-based line and column of the deepest part of `path` that is written in `root`.
pub(super) fn locate(root: &Spanned<Node>, path: &str) -> Option<(u64, u64)> {
    let mut node = root;
    let mut best = super::loc(&node.referenced);
    for part in parts(path) {
        let next = match (&node.value, part) {
            (Node::Map(m), Part::Key(k)) => m.get(k),
            (Node::Seq(s), Part::Index(i)) => s.get(i),
            _ => None,
        };
        let Some(n) = next else { break };
        node = n;
        best = super::loc(&node.referenced).or(best);
    }
    best
}

/// Gives the problems found across fields, which carry no location of their own, the place
/// their path is written (or the nearest enclosing block) in `text`.
pub(super) fn fill(issues: &mut [super::Issue], text: &str) {
    if issues.iter().all(|i| i.location.is_some()) {
        return;
    }
    if let Some(t) = tree(text) {
        for i in issues.iter_mut().filter(|i| i.location.is_none()) {
            if !i.path.contains(": ") {
                i.location = locate(&t, &i.path);
            }
        }
    }
}

/// The tree of a YAML text; `None` when it does not parse (the shapes report that).
pub(super) fn tree(text: &str) -> Option<Spanned<Node>> {
    serde_saphyr::from_str(text).ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_the_deepest_written_part() {
        let text =
            "a: 1\nsections:\n  - name: x\n    start: 2 m\n  - name: y\n    clearance: 6 mm\n";
        let t = tree(text).unwrap();
        assert_eq!(locate(&t, "sections[1].clearance"), Some((6, 16)));
        assert_eq!(locate(&t, "sections[0].start"), Some((4, 12)));
        // Not written: the nearest enclosing value.
        assert_eq!(locate(&t, "sections[1].pole_pitch").map(|l| l.0), Some(5));
        assert_eq!(locate(&t, "sections").map(|l| l.0), Some(3));
        assert_eq!(locate(&t, "generate.corners").map(|l| l.0), Some(1));
    }
}
