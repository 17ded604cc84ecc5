//! A new user's first commands, with the real binary in a temporary folder: `init` for every
//! starter (written, refused over an existing file without --force, each passing `check`),
//! `schema` checked by a general-purpose JSON Schema validator (the `jsonschema` crate) against
//! every shipped scenario, limit set and starter, and against wrong files; `completions` and
//! `manpage` read by the shell and by nroff.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str], dir: &Path) -> Output {
    Command::new(bin())
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the binary runs")
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

const KINDS: [&str; 4] = ["tower", "coaster", "rollback", "sled"];

fn yaml_files(dir: &Path) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "yaml"))
        .collect();
    v.sort();
    v
}

/// A YAML document as a JSON value (what an editor's YAML support validates).
fn as_json(yaml: &str) -> Value {
    serde_saphyr::from_str(yaml).unwrap()
}

fn validator(args: &[&str]) -> jsonschema::Validator {
    let tmp = tempfile::tempdir().unwrap();
    let o = run(args, tmp.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let schema: Value = serde_json::from_str(&stdout(&o)).expect("the schema is JSON");
    // The schema itself is a valid draft-07 schema (checked against the meta-schema).
    assert!(
        jsonschema::meta::is_valid(&schema),
        "the schema is valid against its meta-schema"
    );
    assert_eq!(schema["$schema"], "http://json-schema.org/draft-07/schema#");
    jsonschema::validator_for(&schema).unwrap()
}

fn errors(v: &jsonschema::Validator, doc: &Value) -> Vec<String> {
    v.iter_errors(doc)
        .map(|e| format!("{}: {e}", e.instance_path()))
        .collect()
}

#[test]
fn init_writes_every_starter_and_each_passes_check() {
    let tmp = tempfile::tempdir().unwrap();
    for kind in KINDS {
        let file = format!("{kind}.yaml");
        let o = run(&["init", kind, &file], tmp.path());
        assert_eq!(o.status.code(), Some(0), "{kind}: {}", stderr(&o));
        assert!(
            stderr(&o).contains(&format!("wrote {file}")),
            "{kind}: says what it wrote"
        );
        let written = std::fs::read_to_string(tmp.path().join(&file)).unwrap();
        assert!(written.contains("INVENTED"), "{kind}: marked as invented");
        // Without FILE: the same text on standard output.
        let o = run(&["init", kind], tmp.path());
        assert_eq!(o.status.code(), Some(0));
        assert_eq!(stdout(&o), written, "{kind}: stdout is the file");
        // The starter passes every check.
        let o = run(&["check", &file], tmp.path());
        assert_eq!(o.status.code(), Some(0), "{kind}: check\n{}", stdout(&o));
        assert!(stdout(&o).contains("PASS"), "{kind}");
        // An existing file is not overwritten without --force.
        std::fs::write(tmp.path().join(&file), "keep me").unwrap();
        let o = run(&["init", kind, &file], tmp.path());
        assert_eq!(o.status.code(), Some(2), "{kind}: refused");
        assert!(stderr(&o).contains("--force"), "{}", stderr(&o));
        assert_eq!(
            std::fs::read_to_string(tmp.path().join(&file)).unwrap(),
            "keep me"
        );
        let o = run(&["init", kind, &file, "--force"], tmp.path());
        assert_eq!(o.status.code(), Some(0));
        assert_eq!(
            std::fs::read_to_string(tmp.path().join(&file)).unwrap(),
            written
        );
    }
    // An unknown kind is a usage error that lists the kinds.
    let o = run(&["init", "lift"], tmp.path());
    assert_eq!(o.status.code(), Some(2));
    for kind in KINDS {
        assert!(stderr(&o).contains(kind), "{}", stderr(&o));
    }
}

#[test]
fn schema_accepts_every_shipped_scenario_and_starter() {
    let v = validator(&["schema"]);
    let mut files = yaml_files(&root().join("scenarios"));
    files.extend(yaml_files(&root().join("scenarios/starters")));
    assert!(files.len() >= 7, "demos and starters: {files:?}");
    for f in &files {
        let doc = as_json(&std::fs::read_to_string(f).unwrap());
        let e = errors(&v, &doc);
        assert!(e.is_empty(), "{f:?}: {e:#?}");
    }
    // Every starter as `init` prints it.
    let tmp = tempfile::tempdir().unwrap();
    for kind in KINDS {
        let doc = as_json(&stdout(&run(&["init", kind], tmp.path())));
        assert!(errors(&v, &doc).is_empty(), "{kind}");
    }
    // Limit set files have their own schema.
    let lv = validator(&["schema", "--limits-file"]);
    let limits = yaml_files(&root().join("scenarios/limits"));
    assert!(!limits.is_empty());
    for f in &limits {
        let doc = as_json(&std::fs::read_to_string(f).unwrap());
        let e = errors(&lv, &doc);
        assert!(e.is_empty(), "{f:?}: {e:#?}");
        assert!(!v.is_valid(&doc), "{f:?} is not a scenario");
    }
}

#[test]
fn schema_rejects_wrong_files() {
    let v = validator(&["schema"]);
    let good = std::fs::read_to_string(root().join("scenarios/starters/coaster.yaml")).unwrap();
    assert!(v.is_valid(&as_json(&good)));
    // (replace, by, the instance path the validator must blame)
    let wrong = [
        ("  mass: 6.0 t ", "  mass: 0,9 t ", "/vehicle/mass"),
        ("  mass: 6.0 t ", "  mass: 6.0 furlongs ", "/vehicle/mass"),
        (
            "    clearance: 8 mm",
            "    clearance: 8 km/h",
            "/sections/0/clearance",
        ),
        ("  fin: 20 °C", "  fin: 20", "/temperatures/fin"),
        (
            "    x: { min: -1.5 g }",
            "    x: { min: -1.5 }",
            "/limits/peak/x/min",
        ),
        ("  track_axis: x ", "  track_axis: w ", "/rider/track_axis"),
        (
            "  rolling: 0.004",
            "  rolling: 0.004\n  rolling_friction: 1",
            "/resistance",
        ),
        ("    - [60 m, -0.5 m]", "    - [60 m]", "/track/profile/1"),
        ("version: 1", "version: one", "/version"),
    ];
    for (from, to, at) in wrong {
        assert!(good.contains(from), "{from}");
        let doc = as_json(&good.replacen(from, to, 1));
        let e = errors(&v, &doc);
        assert!(
            e.iter().any(|m| m.starts_with(&format!("{at}:"))),
            "{to:?}: expected an error at {at}, got {e:#?}"
        );
    }
    // A scenario without its name.
    let doc = as_json(&good.replacen("name: Starter coaster", "title: Starter coaster", 1));
    assert!(!v.is_valid(&doc));
}

#[test]
fn completions_and_manual_pages() {
    let tmp = tempfile::tempdir().unwrap();
    let commands = [
        "curve",
        "run",
        "check",
        "report",
        "plan",
        "heat",
        "init",
        "schema",
        "completions",
        "manpage",
    ];
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let o = run(&["completions", shell], tmp.path());
        assert_eq!(o.status.code(), Some(0), "{shell}");
        let script = stdout(&o);
        for c in commands {
            assert!(script.contains(c), "{shell}: {c}");
        }
    }
    // bash reads the script without a syntax error (bash -n), when bash is there.
    let script = tmp.path().join("eddyzone.bash");
    std::fs::write(&script, stdout(&run(&["completions", "bash"], tmp.path()))).unwrap();
    match Command::new("bash").arg("-n").arg(&script).output() {
        Ok(o) => assert!(o.status.success(), "{}", stderr(&o)),
        Err(e) => eprintln!("note: bash not run ({e}); syntax check skipped"),
    }
    let o = run(&["completions", "tcsh"], tmp.path());
    assert_eq!(o.status.code(), Some(2), "unknown shell");

    let page = stdout(&run(&["manpage"], tmp.path()));
    assert!(page.contains(".TH eddyzone 1"), "{page}");
    for c in commands {
        assert!(page.contains(&format!("eddyzone\\-{c}(1)")), "{c} listed");
    }
    let o = run(&["manpage", "init"], tmp.path());
    assert_eq!(o.status.code(), Some(0));
    let init = stdout(&o);
    assert!(init.contains(".TH eddyzone-init 1") || init.contains(".TH eddyzone\\-init 1"));
    assert!(init.contains("\\-\\-force"), "{init}");
    assert_eq!(run(&["manpage", "fly"], tmp.path()).status.code(), Some(2));
    // nroff (groff) formats the page, when it is installed.
    let file = tmp.path().join("eddyzone.1");
    std::fs::write(&file, &page).unwrap();
    match Command::new("nroff").arg("-man").arg(&file).output() {
        Ok(o) => {
            // Bold is printed by overstriking (c, backspace, c): keep the last of each.
            let raw = String::from_utf8_lossy(&o.stdout);
            let mut text = String::new();
            for c in raw.chars() {
                if c == '\u{8}' {
                    text.pop();
                } else {
                    text.push(c);
                }
            }
            assert!(o.status.success());
            assert!(text.contains("SUBCOMMANDS"), "{text}");
            assert!(text.contains("eddyzone-init(1)") || text.contains("eddyzone‐init(1)"));
        }
        Err(e) => eprintln!("note: nroff not run ({e}); formatting check skipped"),
    }
}
