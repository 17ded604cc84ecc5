//! Cases that are relabellings of an earlier case: computed once, their results carried over.
//!
//! The computation reads a lane only as a label: a section acts on the fins of its own lane
//! (`dynamics::model`), and nothing else looks at it. So when two lanes carry the same fins and
//! the same sections — every field but the names equal, in the same order — swapping the two
//! labels maps the scenario onto itself. A case whose out-of-service sections are the swap of
//! an earlier case's (`full/without-W-2` and `full/without-E-2` on a gondola with one magnet
//! column per face), and which is otherwise the same, has the earlier case's results with its
//! fins and sections relabelled. Computing it again would only sum the same pair forces in
//! another order: the carried-over results differ from a direct computation by rounding alone,
//! and both are as close to a tight solve (DEVELOPERS "the coupled track-fin passes amplify
//! rounding"; the test `mirrored_cases_match_their_direct_computation` holds the figure).
//!
//! Only what the symmetry carries exactly is relabelled: per-fin and per-section rows are
//! permuted and renamed; everything else (the samples, the trajectory, scalar results) is the
//! same motion. A result with warnings is never carried over (their wording names fins and
//! sections), nor is a run whose options set per-fin start states: such a case is computed
//! directly.

use crate::dynamics::{RunOptions, RunResult};
use crate::scenario::{Case, CaseOrigin, Fin, Scenario, Section};
use crate::thermal::CaseHeat;
use std::collections::HashMap;

/// A relabelling of the scenario's fins and sections that maps it onto itself: fin `j` plays
/// the part of fin `fins[j]`, section `k` that of section `sections[k]`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Relabel {
    /// Image of each fin index.
    pub fins: Vec<usize>,
    /// Image of each section index.
    pub sections: Vec<usize>,
}

/// For each case, the earlier case whose results it takes over and the relabelling between
/// them (None: the case is computed).
#[derive(Debug, Clone, Default)]
pub struct Mirrors {
    /// Per case: (source case, index into `relabels`).
    source: Vec<Option<(usize, usize)>>,
    relabels: Vec<Relabel>,
}

impl Mirrors {
    /// The mirror cases of `scenario`: every lane swap that maps it onto itself, and for each
    /// case the first earlier computed case that it is the image of under one of them.
    pub fn of(scenario: &Scenario) -> Self {
        let n = scenario.cases.len();
        let mut source = vec![None; n];
        if n < 2 {
            // A sweep's or a planner's one-case study: nothing to carry over.
            return Self {
                source,
                relabels: Vec::new(),
            };
        }
        let relabels = lane_swaps(scenario);
        let identity = Relabel {
            fins: (0..scenario.fins.len()).collect(),
            sections: (0..scenario.sections.len()).collect(),
        };
        let mut first_of: HashMap<String, usize> = HashMap::new();
        for (i, c) in scenario.cases.iter().enumerate() {
            first_of
                .entry(case_key(scenario, c, &identity))
                .or_insert(i);
        }
        for i in 0..n {
            if source[i].is_some() {
                continue;
            }
            for (t, r) in relabels.iter().enumerate() {
                let image = case_key(scenario, &scenario.cases[i], r);
                if let Some(&j) = first_of.get(&image) {
                    if j > i && source[j].is_none() {
                        source[j] = Some((i, t));
                    }
                }
            }
        }
        Self { source, relabels }
    }

    /// The case whose results case `i` takes over, with the relabelling (None: computed).
    pub fn source_of(&self, i: usize) -> Option<(usize, &Relabel)> {
        self.source
            .get(i)
            .copied()
            .flatten()
            .map(|(s, t)| (s, &self.relabels[t]))
    }

    /// Number of cases whose results are carried over.
    pub fn carried(&self) -> usize {
        self.source.iter().filter(|s| s.is_some()).count()
    }

    /// Whether runs with these options may be carried over: none that sets per-fin start states
    /// (those belong to one case's fins, not to their images).
    pub fn apply_to(options: &RunOptions) -> bool {
        options.fin_start_temps_c.is_none() && options.track_fin_fields.is_none()
    }
}

/// The identity (it carries a case over to a later duplicate of it) and every swap of two
/// lanes that maps the scenario's fins and sections onto themselves.
fn lane_swaps(s: &Scenario) -> Vec<Relabel> {
    let mut lanes: Vec<&str> = Vec::new();
    for l in s
        .fins
        .iter()
        .map(|f| f.lane.as_str())
        .chain(s.sections.iter().map(|x| x.lane.as_str()))
    {
        if !lanes.contains(&l) {
            lanes.push(l);
        }
    }
    let identity = Relabel {
        fins: (0..s.fins.len()).collect(),
        sections: (0..s.sections.len()).collect(),
    };
    let mut out = vec![identity.clone()];
    for (a, la) in lanes.iter().enumerate() {
        for lb in &lanes[a + 1..] {
            let mut r = identity.clone();
            if swap_into(&mut r.fins, &s.fins, la, lb, |f| &f.lane, same_fin)
                && swap_into(
                    &mut r.sections,
                    &s.sections,
                    la,
                    lb,
                    |x| &x.lane,
                    same_section,
                )
            {
                out.push(r);
            }
        }
    }
    out
}

/// Pairs the items of lane `a` with those of lane `b` in order into `image` (both ways);
/// false when the lanes do not hold equal items.
fn swap_into<T>(
    image: &mut [usize],
    items: &[T],
    a: &str,
    b: &str,
    lane: impl Fn(&T) -> &String,
    same: impl Fn(&T, &T) -> bool,
) -> bool {
    let in_lane =
        |l: &str| -> Vec<usize> { (0..items.len()).filter(|&i| lane(&items[i]) == l).collect() };
    let (ia, ib) = (in_lane(a), in_lane(b));
    if ia.len() != ib.len()
        || !ia
            .iter()
            .zip(&ib)
            .all(|(&i, &j)| same(&items[i], &items[j]))
    {
        return false;
    }
    for (&i, &j) in ia.iter().zip(&ib) {
        image[i] = j;
        image[j] = i;
    }
    true
}

/// Equal in every field but the name and the lane.
fn same_fin(a: &Fin, b: &Fin) -> bool {
    let blank = |f: &Fin| Fin {
        name: String::new(),
        lane: String::new(),
        ..f.clone()
    };
    blank(a) == blank(b)
}

/// Equal in every field but the name and the lane.
fn same_section(a: &Section, b: &Section) -> bool {
    let blank = |x: &Section| Section {
        name: String::new(),
        lane: String::new(),
        ..x.clone()
    };
    blank(a) == blank(b)
}

/// A text that two cases share exactly when they are the same computation: every field but
/// the name, with the out-of-service sections (and the section an N-1 case names) taken
/// through `r`. Written with `{:?}`, which gives every f64 its shortest exact form.
fn case_key(s: &Scenario, c: &Case, r: &Relabel) -> String {
    let mut disabled: Vec<usize> = c
        .disabled
        .iter()
        .map(|&k| r.sections.get(k).copied().unwrap_or(k))
        .collect();
    disabled.sort_unstable();
    let origin = match &c.origin {
        CaseOrigin::SectionOut { base, section } => CaseOrigin::SectionOut {
            base: base.clone(),
            section: s
                .sections
                .iter()
                .position(|x| &x.name == section)
                .and_then(|k| r.sections.get(k))
                .map_or_else(|| section.clone(), |&k| s.sections[k].name.clone()),
        },
        o => o.clone(),
    };
    let key = Case {
        name: String::new(),
        origin,
        disabled,
        ..c.clone()
    };
    format!("{key:?}")
}

/// `v` (one entry per fin or section of the source) in the order of the image; None when its
/// length is not the relabelling's.
fn permuted<T: Clone>(v: &[T], image: &[usize]) -> Option<Vec<T>> {
    if v.len() != image.len() {
        return None;
    }
    let mut out: Vec<Option<T>> = vec![None; v.len()];
    for (x, &j) in v.iter().zip(image) {
        *out.get_mut(j)? = Some(x.clone());
    }
    out.into_iter().collect()
}

/// [`permuted`], each entry then named after its place (`names` in scenario order).
fn renamed<'a, T: Clone>(
    v: &[T],
    image: &[usize],
    names: impl Iterator<Item = &'a String>,
    name: impl Fn(&mut T) -> &mut String,
) -> Option<Vec<T>> {
    let mut out = permuted(v, image)?;
    for (x, n) in out.iter_mut().zip(names) {
        name(x).clone_from(n);
    }
    Some(out)
}

/// The run of `case` from the run of its source: fins and sections permuted and renamed.
/// None when the run carries warnings or does not list every fin and section.
pub fn relabel_run(s: &Scenario, run: &RunResult, r: &Relabel, case: &Case) -> Option<RunResult> {
    if !run.warnings.is_empty() {
        return None;
    }
    let fins = renamed(&run.fins, &r.fins, s.fins.iter().map(|f| &f.name), |f| {
        &mut f.fin
    })?;
    let sections = if run.sections.is_empty() {
        Vec::new()
    } else {
        let names = s.sections.iter().map(|x| &x.name);
        renamed(&run.sections, &r.sections, names, |l| &mut l.section)?
    };
    Some(RunResult {
        case: case.name.clone(),
        fins,
        sections,
        ..run.clone()
    })
}

/// The heat of `case` from the heat of its source: fins, their rows, profiles and states
/// permuted and renamed. None when it carries warnings or its last run cannot be relabelled.
pub fn relabel_heat(s: &Scenario, heat: &CaseHeat, r: &Relabel, case: &Case) -> Option<CaseHeat> {
    if !heat.warnings.is_empty() {
        return None;
    }
    let last_run = match &heat.last_run {
        Some(run) => Some(relabel_run(s, run, r, case)?),
        None => None,
    };
    let fins = renamed(&heat.fins, &r.fins, s.fins.iter().map(|f| &f.name), |f| {
        &mut f.fin
    })?;
    let mut cycles = heat.cycles.clone();
    for row in &mut cycles {
        row.fin_peaks_c = permuted(&row.fin_peaks_c, &r.fins)?;
        row.fin_means_c = permuted(&row.fin_means_c, &r.fins)?;
    }
    // Profiles of the track fins, in the scenario's fin order like the direct computation's.
    let index = |name: &str| s.fins.iter().position(|f| f.name == name);
    let mut track_profiles = Vec::with_capacity(heat.track_profiles.len());
    for p in &heat.track_profiles {
        let j = *r.fins.get(index(&p.fin)?)?;
        let mut q = p.clone();
        q.fin.clone_from(&s.fins[j].name);
        track_profiles.push((j, q));
    }
    track_profiles.sort_by_key(|(j, _)| *j);
    let steady_start = if heat.steady_start.is_empty() {
        Vec::new()
    } else {
        permuted(&heat.steady_start, &r.fins)?
    };
    Some(CaseHeat {
        case: case.name.clone(),
        fins,
        cycles,
        track_profiles: track_profiles.into_iter().map(|(_, p)| p).collect(),
        last_run,
        steady_start,
        ..heat.clone()
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn tower() -> Scenario {
        crate::scenario::shipped("scenarios/tower-catch-brake.yaml")
    }

    #[test]
    fn the_towers_one_unit_out_cases_pair_east_with_west() {
        let s = tower();
        let m = Mirrors::of(&s);
        // 3 listed cases, each with 8 one-unit-out cases: the W ones take over the E ones.
        assert_eq!(m.carried(), 12);
        for (i, c) in s.cases.iter().enumerate() {
            match m.source_of(i) {
                Some((src, r)) => {
                    assert!(c.name.contains("without-W-"), "{}", c.name);
                    let from = &s.cases[src];
                    assert_eq!(from.name, c.name.replace("without-W-", "without-E-"));
                    // The relabelling swaps the faces: each east fin and unit with its twin.
                    for (k, &j) in r.sections.iter().enumerate() {
                        assert_ne!(s.sections[k].lane, s.sections[j].lane);
                    }
                    let out: Vec<usize> = from.disabled.iter().map(|&k| r.sections[k]).collect();
                    assert_eq!(out, c.disabled);
                }
                None => assert!(!c.name.contains("without-W-"), "{}", c.name),
            }
        }
    }

    #[test]
    fn a_lane_that_differs_in_one_field_has_no_mirror() {
        let mut s = tower();
        let k = s
            .sections
            .iter()
            .position(|x| x.lane == "west")
            .expect("a west unit");
        s.sections[k].remanence_temp_coeff_per_k *= 1.0 + 1e-15;
        assert_eq!(Mirrors::of(&s).carried(), 0);
        let mut s = tower();
        let f = s
            .fins
            .iter()
            .position(|f| f.lane == "west")
            .expect("a west fin");
        s.fins[f].thickness_m += 1e-9;
        assert_eq!(Mirrors::of(&s).carried(), 0);
    }

    #[test]
    fn cases_that_differ_in_anything_but_the_swap_are_computed() {
        let mut s = tower();
        let w = s
            .cases
            .iter()
            .position(|c| c.name == "full/without-W-3")
            .expect("the case");
        s.cases[w].mass_kg += 1.0;
        let m = Mirrors::of(&s);
        assert_eq!(m.carried(), 11);
        assert!(m.source_of(w).is_none());
    }

    #[test]
    fn permuting_puts_each_entry_at_its_image() {
        assert_eq!(permuted(&[10, 20, 30], &[2, 0, 1]), Some(vec![20, 30, 10]));
        assert_eq!(permuted(&[10, 20], &[1, 0, 2]), None);
        assert_eq!(permuted(&[10, 20], &[1, 1]), None);
    }
}
