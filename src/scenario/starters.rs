//! Commented starter scenarios (`eddyzone init KIND`), embedded from `scenarios/starters/`:
//! invented names and numbers, each of which runs and passes `check` as shipped.

/// One starter scenario.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Starter {
    /// The kind's name on the command line (`tower`, `coaster`, `rollback`, `sled`).
    pub kind: &'static str,
    /// What it is.
    pub about: &'static str,
    /// The file's text.
    pub text: &'static str,
}

/// Every starter, in the order `init` lists them.
pub const STARTERS: [Starter; 4] = [
    Starter {
        kind: "tower",
        about: "the catch brake of a free-fall tower (magnets on the gondola, fins on the tower)",
        text: include_str!("../../scenarios/starters/tower.yaml"),
    },
    Starter {
        kind: "coaster",
        about: "a coaster brake run (fins under the cars, magnet sections along the track)",
        text: include_str!("../../scenarios/starters/coaster.yaml"),
    },
    Starter {
        kind: "rollback",
        about: "rollback brakes on a launch track (the train enters backwards)",
        text: include_str!("../../scenarios/starters/rollback.yaml"),
    },
    Starter {
        kind: "sled",
        about: "the arrester of an unmanned test sled (no rider block)",
        text: include_str!("../../scenarios/starters/sled.yaml"),
    },
];

/// The starter of a kind.
pub fn starter(kind: &str) -> Option<&'static Starter> {
    STARTERS.iter().find(|s| s.kind == kind)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_starter_reads_and_says_it_is_invented() {
        for s in &STARTERS {
            let sc = crate::scenario::parse_str(s.text, s.kind, None)
                .unwrap_or_else(|e| panic!("{}: {e}", s.kind));
            assert!(sc.name.contains("(invented)"), "{}: name", s.kind);
            assert!(
                s.text.contains("INVENTED"),
                "{}: marked as invented",
                s.kind
            );
            assert!(s.text.contains(&format!("eddyzone init {}", s.kind)));
            assert_eq!(starter(s.kind), Some(s));
        }
        assert_eq!(starter("lift"), None);
    }
}
