//! A fuzz harness over the parser and the whole pipeline (force tables → runs → fin heat →
//! verdict → force curves), in process: mutated shipped scenarios and the recorded hostile
//! inputs of `tests/fuzz-corpus/`. Errors are fine; a panic, an abort or an input that takes
//! longer than [`PER_INPUT`] is a failure.
//!
//! CI runs a short slice (`EDDYZONE_FUZZ_CASES`, default 24 mutated inputs per test). The long
//! run, nightly-style on a many-core machine (hours):
//!
//! ```text
//! EDDYZONE_FUZZ_CASES=1000000 cargo test --release --test fuzz -- --nocapture
//! ```
//!
//! A failing input is shrunk by proptest and saved in `tests/fuzz.proptest-regressions`, which
//! is replayed first on every later run.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::curve::CurveOptions;
use eddyzone::scenario::parse_str;
use eddyzone::study::{JudgeOptions, Silent, Study};
use proptest::prelude::*;
use std::path::PathBuf;
use std::time::{Duration, Instant};

mod common;
use common::numbers;

/// The longest any one input may take through the whole pipeline (common practice: a hang
/// shows as minutes; the slowest shipped demo takes about 4 s on the 2-core CI machine).
const PER_INPUT: Duration = Duration::from_secs(60);

fn scenarios() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios")
}

fn cases() -> u32 {
    std::env::var("EDDYZONE_FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(24)
}

/// Every stage a command can reach, on one input. Returns how far it got.
fn pipeline(text: &str, name: &str) -> &'static str {
    let t = Instant::now();
    let stage = (|| {
        let Ok(s) = parse_str(text, name, Some(&scenarios())) else {
            return "refused";
        };
        let Ok(study) = Study::new(s) else {
            return "no tables";
        };
        let _ = study.curves(&CurveOptions {
            section: None,
            speeds_m_s: study.default_speeds(),
            fin_temp_c: None,
            magnet_temp_c: None,
        });
        match study.judge(&JudgeOptions::default(), &Silent) {
            Ok(j) => {
                let _ = format!("{:?}", j.verdict);
                "judged"
            }
            Err(_) => "no verdict",
        }
    })();
    let took = t.elapsed();
    assert!(took < PER_INPUT, "{name}: {took:?} ({stage})");
    stage
}

/// The shipped demos the mutations start from.
fn bases() -> Vec<(String, String)> {
    [
        "coaster-brake-run.yaml",
        "tower-catch-brake.yaml",
        "coaster-plan.yaml",
    ]
    .iter()
    .map(|f| {
        (
            f.to_string(),
            std::fs::read_to_string(scenarios().join(f)).unwrap(),
        )
    })
    .collect()
}

/// One mutation of a scenario's text.
#[derive(Debug, Clone)]
enum Mutation {
    /// The n-th number becomes this text.
    Number(usize, String),
    /// The n-th number is multiplied by this factor (mostly keeps the input valid, so the
    /// pipeline beyond validation is reached).
    Scale(usize, f64),
    /// The n-th line goes.
    DeleteLine(usize),
    /// The n-th line appears twice.
    DuplicateLine(usize),
    /// The n-th unit word becomes another.
    Unit(usize, &'static str),
    /// Text inserted at a byte position (on a char boundary at or after it).
    Insert(usize, String),
}

const UNITS: &[&str] = &[
    "m",
    "mm",
    "km",
    "s",
    "ms",
    "t",
    "kg",
    "T",
    "mT",
    "°C",
    "K",
    "deg",
    "m/s",
    "km/h",
    "g",
    "N",
    "%/K",
    "W/(m^2*K)",
    "furlong",
];

fn hostile_number() -> impl Strategy<Value = String> {
    prop_oneof![
        Just("0".to_string()),
        Just("-1".to_string()),
        Just("1e18".to_string()),
        Just("1e308".to_string()),
        Just("1e-300".to_string()),
        Just("-1e300".to_string()),
        Just(".nan".to_string()),
        Just(".inf".to_string()),
        Just("0,9".to_string()),
        Just("99999".to_string()),
        (0.0f64..1000.0).prop_map(|x| format!("{x}")),
        (-5.0f64..5.0).prop_map(|x| format!("{x:e}")),
    ]
}

fn mutation() -> impl Strategy<Value = Mutation> {
    prop_oneof![
        2 => (0usize..400, hostile_number()).prop_map(|(n, v)| Mutation::Number(n, v)),
        5 => (0usize..400, prop_oneof![0.01f64..100.0, 0.5f64..2.0]).prop_map(|(n, f)| Mutation::Scale(n, f)),
        1 => (0usize..200).prop_map(Mutation::DeleteLine),
        1 => (0usize..200).prop_map(Mutation::DuplicateLine),
        1 => (0usize..400, prop::sample::select(UNITS)).prop_map(|(n, u)| Mutation::Unit(n, u)),
        1 => (0usize..8000, "[ -~\n]{0,20}").prop_map(|(p, t)| Mutation::Insert(p, t)),
    ]
}

fn apply(text: &str, m: &Mutation) -> String {
    match m {
        Mutation::Number(n, v) => {
            let nums = numbers(text);
            if nums.is_empty() {
                return text.to_string();
            }
            let (a, b) = nums[n % nums.len()];
            format!("{}{v}{}", &text[..a], &text[b..])
        }
        Mutation::Scale(n, f) => {
            let nums = numbers(text);
            if nums.is_empty() {
                return text.to_string();
            }
            let (a, b) = nums[n % nums.len()];
            match text[a..b].parse::<f64>() {
                Ok(x) => format!("{}{}{}", &text[..a], x * f, &text[b..]),
                Err(_) => text.to_string(),
            }
        }
        Mutation::DeleteLine(n) | Mutation::DuplicateLine(n) => {
            let lines: Vec<&str> = text.lines().collect();
            let k = n % lines.len().max(1);
            let mut out = String::new();
            for (i, l) in lines.iter().enumerate() {
                if i != k || matches!(m, Mutation::DuplicateLine(_)) {
                    out.push_str(l);
                    out.push('\n');
                }
                if i == k && matches!(m, Mutation::DuplicateLine(_)) {
                    out.push_str(l);
                    out.push('\n');
                }
            }
            out
        }
        Mutation::Unit(n, u) => {
            // A unit word: the letters after a number and a space.
            let spots: Vec<(usize, usize)> = numbers(text)
                .into_iter()
                .filter_map(|(_, b)| {
                    let rest = &text[b..];
                    let word = rest.strip_prefix(' ')?;
                    let len = word
                        .find(|c: char| c.is_whitespace() || c == ',' || c == '}' || c == ']')
                        .unwrap_or(word.len());
                    (len > 0).then_some((b + 1, b + 1 + len))
                })
                .collect();
            if spots.is_empty() {
                return text.to_string();
            }
            let (a, b) = spots[n % spots.len()];
            format!("{}{u}{}", &text[..a], &text[b..])
        }
        Mutation::Insert(p, t) => {
            let mut at = (*p).min(text.len());
            while !text.is_char_boundary(at) {
                at += 1;
            }
            format!("{}{t}{}", &text[..at], &text[at..])
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), ..ProptestConfig::default() })]

    /// Up to three mutations of a shipped demo through the whole pipeline.
    #[test]
    fn mutated_demos_never_panic_or_hang(
        which in 0usize..3,
        ms in prop::collection::vec(mutation(), 1..=3),
    ) {
        let (name, base) = &bases()[which];
        let text = ms.iter().fold(base.clone(), |t, m| apply(&t, m));
        pipeline(&text, name);
    }

    /// One mutation of a recorded hostile input.
    #[test]
    fn mutated_corpus_never_panics_or_hangs(which in 0usize..1000, m in mutation()) {
        let corpus = corpus();
        let (name, text) = &corpus[which % corpus.len()];
        pipeline(&apply(text, &m), name);
    }
}

/// The recorded hostile inputs.
fn corpus() -> Vec<(String, String)> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fuzz-corpus");
    let mut v: Vec<(String, String)> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| {
            let p = e.unwrap().path();
            (
                p.file_name().unwrap().to_string_lossy().into_owned(),
                std::fs::read_to_string(&p).unwrap(),
            )
        })
        .collect();
    v.sort();
    v
}

/// Every recorded hostile input goes through the pipeline as it is; the ones that make no
/// physical sense stop at validation.
#[test]
fn the_corpus_goes_through_without_panic_or_hang() {
    let corpus = corpus();
    assert!(corpus.len() >= 15, "{}", corpus.len());
    for (name, text) in &corpus {
        let stage = pipeline(text, name);
        let expected_valid = [
            "rtol-1.1e-14.yaml",
            "start-beyond-the-zone.yaml",
            "colliding-and-long-names.yaml",
            "tower-fin-0.1-mm.yaml",
            "coaster-fin-0.1-mm.yaml",
        ];
        if expected_valid.contains(&name.as_str()) {
            assert_eq!(stage, "judged", "{name}");
        } else {
            assert_eq!(stage, "refused", "{name}");
        }
    }
}

/// The mutations do mutate (a harness that changes nothing tests nothing).
#[test]
fn mutations_change_the_text() {
    let (_, base) = &bases()[0];
    for m in [
        Mutation::Number(3, "1e308".into()),
        Mutation::Scale(3, 1.5),
        Mutation::DeleteLine(10),
        Mutation::DuplicateLine(10),
        Mutation::Unit(2, "furlong"),
        Mutation::Insert(100, "{[".into()),
    ] {
        assert_ne!(&apply(base, &m), base, "{m:?}");
    }
}
