//! Layout planner against an independent exhaustive search, and end to end.
//!
//! Reference: on a small instance (4 slots × 2 clearance settings, every slot empty or holding a
//! module at either setting: 3^4 − 1 layouts) the exhaustive enumeration written here, ordered by
//! zone length then module count, is the ground truth for "shortest, then fewest modules". The
//! verdict of every layout comes from full simulation (`checks::verdict`).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::plan::{candidate_scenario, evaluate, plan, zone_length_m, Layout, PlanOptions};
use eddyzone::scenario::{self, Scenario};
use eddyzone::study::Silent;
use std::path::Path;
use std::process::Command;

fn demo() -> Scenario {
    scenario::load(Path::new("scenarios/coaster-plan.yaml")).expect("demo scenario loads")
}

/// The demo reduced to 4 slots and the 5 mm and 8 mm settings; exit speed window widened so
/// that short layouts can pass.
fn small() -> Scenario {
    let mut s = demo();
    let p = s.plan.as_mut().expect("plan block");
    p.clearances_m = vec![0.005, 0.008];
    p.max_length_m = 3.0 * p.slot_pitch_m + p.module_length_m;
    s.limits.exit_speed_max_m_s = Some(19.0);
    s
}

fn all_layouts(slots: usize, levels: usize) -> Vec<Layout> {
    let mut out = Vec::new();
    let total = (levels + 1).pow(slots as u32);
    for code in 1..total {
        let mut c = code;
        let mut l = Vec::new();
        for _ in 0..slots {
            let d = c % (levels + 1);
            c /= levels + 1;
            l.push(if d == 0 { None } else { Some(d - 1) });
        }
        out.push(l);
    }
    out
}

#[test]
fn planner_equals_exhaustive_search_on_a_small_instance() {
    let s = small();
    let p = s.plan.clone().expect("plan");
    assert_eq!(eddyzone::plan::slot_count(&p), 4);
    let mut feasible: Vec<(f64, usize, Layout)> = Vec::new();
    for l in all_layouts(4, 2) {
        let c = candidate_scenario(&s, &p, &l);
        let v = evaluate(&c).expect("simulates");
        if v.pass {
            // Zone length counted from the plan's zone start (first slot), as the planner does.
            let last = l.iter().rposition(|c| c.is_some()).expect("non-empty");
            let len = last as f64 * p.slot_pitch_m + p.module_length_m;
            feasible.push((len, l.iter().filter(|c| c.is_some()).count(), l));
        }
    }
    assert!(
        !feasible.is_empty(),
        "the small instance must have a feasible layout"
    );
    feasible.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let (best_len, best_n, _) = feasible[0].clone();
    let r = plan(&s, &PlanOptions::default(), &Silent).expect("plans");
    assert!(r.feasible);
    let last = r
        .layout
        .iter()
        .rposition(|c| c.is_some())
        .expect("non-empty");
    let len = last as f64 * p.slot_pitch_m + p.module_length_m;
    assert!(
        (len - best_len).abs() < 1e-9,
        "length {len} vs exhaustive {best_len}"
    );
    assert_eq!(r.modules.len(), best_n);
    // The chosen layout is one of the exhaustive search's feasible ones.
    let mut chosen = r.layout.clone();
    chosen.resize(4, None);
    assert!(feasible.iter().any(|f| f.2 == chosen));
    assert!(r.verdict.pass);
    assert!(zone_length_m(&p, &r.layout) <= best_len + 1e-9);
}

#[test]
fn reported_layout_passes_a_fresh_verdict() {
    let s = demo();
    let r = plan(&s, &PlanOptions::default(), &Silent).expect("plans");
    assert!(r.feasible);
    let p = s.plan.clone().expect("plan");
    let again = evaluate(&candidate_scenario(&s, &p, &r.layout)).expect("simulates");
    assert!(again.pass);
    // One N−1 case per module and base case "full".
    let n1 = again
        .cases
        .iter()
        .filter(|c| c.case.starts_with("full/without-P"))
        .count();
    assert_eq!(n1, r.modules.len());
}

#[test]
fn written_scenario_passes_check_end_to_end() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("planned.yaml");
    let exe = env!("CARGO_BIN_EXE_eddyzone");
    let st = Command::new(exe)
        .args(["plan", "scenarios/coaster-plan.yaml", "--json", "--write"])
        .arg(&out)
        .output()
        .expect("runs");
    assert_eq!(
        st.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&st.stderr)
    );
    let j: serde_json::Value = serde_json::from_slice(&st.stdout).expect("json");
    assert_eq!(j["feasible"], true);
    let n = j["modules"].as_array().map(|a| a.len()).unwrap_or(0);
    assert!(n > 0);
    let st = Command::new(exe)
        .arg("check")
        .arg(&out)
        .output()
        .expect("runs");
    assert_eq!(
        st.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&st.stdout)
    );
    let back = scenario::load(&out).expect("written file reads back");
    assert_eq!(back.sections.len(), n);
    assert_eq!(
        back.cases
            .iter()
            .filter(|c| c.name.starts_with("full/without-"))
            .count(),
        n
    );
}

#[test]
fn infeasible_names_the_binding_check() {
    // Four slots at the demo's limits: too few modules to bring the full train below 16 m/s.
    let mut s = demo();
    let p = s.plan.as_mut().expect("plan");
    p.max_length_m = 3.0 * p.slot_pitch_m + p.module_length_m;
    let r = plan(&s, &PlanOptions::default(), &Silent).expect("plans");
    assert!(!r.feasible);
    let reason = r.reason.expect("reason");
    assert!(reason.contains("exit_speed_max"), "{reason}");
    assert!(reason.contains("tightest"), "{reason}");
}
