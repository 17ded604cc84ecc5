//! Energy per cell of a track fin over one pass, from the integrator's dense output.
//!
//! The power into cell k of a pair with the front at x is |f(v, T_k)|·L_k(x)·|v|, with L_k(x)
//! the length of the overlap window inside the cell. With v·dt = dx the energy of the cell is
//! E_k = ∫ |f(v(x), T_k)|·L_k(x) |dx| along the path. Within one piece of the run the direction
//! of travel is fixed, so the path is monotone in x and v(x) is smooth (the continuous output of
//! the steps, inverted for the time at x). L_k is piecewise linear in x with breaks where a
//! window edge meets a cell edge — x = c0 + o, c1 + o, c0 + o + l, c1 + o + l for a magnet unit
//! of length l a distance o behind the front over the cell [c0, c1] — so between breaks the
//! integrand is smooth and Gauss–Legendre quadrature in x is accurate to far below the
//! integrator's tolerance (Abramowitz & Stegun, Handbook of Mathematical Functions, 1964,
//! 25.4.29 and Table 25.4 for the nodes and weights): three nodes on the entry and exit ramps of
//! one cell length, four on the plateau in between. Each node costs one force-law evaluation.

use crate::dynamics::integrate::TempField;
use crate::dynamics::model::ActivePair;
use crate::dynamics::trajectory::{pieces, PathStep, PieceSpeeds};

/// Three-point Gauss–Legendre rule on [−1, 1]: nodes and weights (A&S Table 25.4).
const GAUSS3: [(f64, f64); 3] = [
    (-0.774_596_669_241_483_4, 5.0 / 9.0),
    (0.0, 8.0 / 9.0),
    (0.774_596_669_241_483_4, 5.0 / 9.0),
];

/// Four-point Gauss–Legendre rule on [−1, 1] (A&S Table 25.4).
const GAUSS4: [(f64, f64); 4] = [
    (-0.861_136_311_594_052_6, 0.347_854_845_137_453_9),
    (-0.339_981_043_584_856_3, 0.652_145_154_862_546_1),
    (0.339_981_043_584_856_3, 0.652_145_154_862_546_1),
    (0.861_136_311_594_052_6, 0.347_854_845_137_453_9),
];

/// Nodes of a cell's quadrature: 3 on the entry ramp, 4 on the plateau, 3 on the exit ramp.
const NODES: usize = 10;

/// The first node of each of the three intervals among a cell's [`NODES`].
const FIRST_NODE: [usize; 3] = [0, 3, 7];

/// The run's path, piece by piece, with the speeds at the quadrature nodes remembered. The
/// nodes of a pair over a full cell depend only on the cell's edges, the unit's length and where
/// the unit sits against the cell grid: units a whole number of cells apart (the repeated units
/// of a brake, the twin fins of a two-face brake) meet the same nodes in cells that many apart,
/// to rounding, and each node's speed (a Newton inversion of the step polynomial) is computed
/// once for all of them. A cell cut by the fin's end keeps its own nodes.
pub struct PathNodes<'a> {
    pieces: Vec<PieceNodes<'a>>,
}

/// One piece of the path: its speed lookup, its span and the node sets met on it.
struct PieceNodes<'a> {
    speeds: PieceSpeeds<'a>,
    lo: f64,
    hi: f64,
    sets: Vec<NodeSet>,
}

/// The speeds at the nodes of the cells one unit can reach over one piece, from grid slot
/// `first` on (a slot is a cell index plus the unit's offset in cells; NaN: not computed yet).
struct NodeSet {
    key: NodeKey,
    first: i64,
    speeds: Vec<[f64; NODES]>,
}

/// What the nodes of a pair's full cells depend on: the field's first cell edge and cell
/// length, the vehicle element's length and its offset's remainder against the cell grid (to
/// 1e-12 m: offsets a whole number of cells apart differ there only by rounding), and whether
/// the offset was placed on the grid at all.
type NodeKey = [u64; 5];

/// The node key of a pair and its offset in whole cells (the slot of cell k is k + that).
fn node_key(pair: &ActivePair, law: &TempField) -> (NodeKey, i64) {
    let ov = &pair.spec.overlap;
    let cells = (ov.vehicle_offset_m / law.cell_m).round();
    // An offset beyond 1e12 cells (or not finite) keys on its own bits: nothing shared, and the
    // slot arithmetic stays far inside i64.
    let (remainder_key, on_grid, shift) = if cells.abs() <= 1e12 {
        let remainder = ov.vehicle_offset_m - cells * law.cell_m;
        (((remainder / 1e-12).round() as i64) as u64, 1, cells as i64)
    } else {
        (ov.vehicle_offset_m.to_bits(), 0, 0)
    };
    let key = [
        law.start_m.to_bits(),
        law.cell_m.to_bits(),
        ov.vehicle_len_m.to_bits(),
        remainder_key,
        on_grid,
    ];
    (key, shift)
}

impl<'a> PathNodes<'a> {
    /// The pieces of `path`, with no speed computed yet.
    pub fn new(path: &'a [PathStep]) -> Self {
        let pieces = pieces(path)
            .filter_map(|piece| {
                let speeds = PieceSpeeds::new(piece);
                let (xa, xb) = speeds.span_m()?;
                let (lo, hi) = (xa.min(xb), xa.max(xb));
                (hi - lo > 0.0).then_some(PieceNodes {
                    speeds,
                    lo,
                    hi,
                    sets: Vec::new(),
                })
            })
            .collect();
        Self { pieces }
    }

    /// Energy per cell of the field's fin over the path, unscaled (J): every pair of the fin
    /// (`mine`) over every piece, with the force per metre at each cell's temperature in `law`.
    pub fn cell_energies(&mut self, mine: &[&ActivePair], law: &TempField) -> Vec<f64> {
        let mut energy = vec![0.0; law.temps_c.len()];
        for piece in &mut self.pieces {
            for pair in mine {
                piece.add_pair(pair, law, &mut energy);
            }
        }
        energy
    }
}

impl PieceNodes<'_> {
    /// The node set of `key` over this piece, reaching at least the slots [first, end) (a new
    /// one when none has it; an existing one grows to reach them).
    fn set_for(&mut self, key: NodeKey, first: i64, end: i64) -> usize {
        const UNKNOWN: [f64; NODES] = [f64::NAN; NODES];
        if let Some(i) = self.sets.iter().position(|s| s.key == key) {
            let set = &mut self.sets[i];
            if let Ok(add) = usize::try_from(set.first - first) {
                set.speeds.splice(0..0, std::iter::repeat_n(UNKNOWN, add));
                set.first = first;
            }
            if let Ok(len) = usize::try_from(end - set.first) {
                if len > set.speeds.len() {
                    set.speeds.resize(len, UNKNOWN);
                }
            }
            return i;
        }
        let len = usize::try_from(end - first).unwrap_or(0);
        self.sets.push(NodeSet {
            key,
            first,
            speeds: vec![UNKNOWN; len],
        });
        self.sets.len() - 1
    }

    /// The cells one pair heats while the front moves over the piece.
    fn add_pair(&mut self, pair: &ActivePair, law: &TempField, energy: &mut [f64]) {
        let ov = &pair.spec.overlap;
        let (o, l) = (ov.vehicle_offset_m, ov.vehicle_len_m);
        let (s0, s1) = (ov.track_start_m, ov.track_end_m());
        let (lo, hi) = (self.lo, self.hi);
        let n = energy.len();
        // Cells whose window range [c0 + o, c1 + o + l] meets [lo, hi].
        let k_lo = ((lo - o - l - law.start_m) / law.cell_m).floor().max(0.0) as usize;
        let k_hi = (((hi - o - law.start_m) / law.cell_m).floor().max(-1.0) + 1.0) as usize;
        if k_hi.min(n) <= k_lo {
            return;
        }
        let (key, shift) = node_key(pair, law);
        let slot_of = |k: usize| k as i64 + shift;
        let set = self.set_for(key, slot_of(k_lo), slot_of(k_hi.min(n)));
        let NodeSet {
            first,
            speeds: known,
            ..
        } = &mut self.sets[set];
        let first = *first;
        let speeds = &mut self.speeds;
        for (k, e) in energy.iter_mut().enumerate().take(k_hi.min(n)).skip(k_lo) {
            let (c0_full, c1_full) = (
                law.start_m + k as f64 * law.cell_m,
                law.start_m + (k + 1) as f64 * law.cell_m,
            );
            let (c0, c1) = (c0_full.max(s0), c1_full.min(s1));
            if c1 <= c0 {
                continue;
            }
            // A cell cut by the fin's end has nodes of its own.
            let full = c0 == c0_full && c1 == c1_full;
            let mut b = [c0 + o, c1 + o, c0 + o + l, c1 + o + l];
            b.sort_by(f64::total_cmp);
            // σ(T)/σ_ref of the cell, once for its nodes (the number force_per_m_n forms).
            let sigma = pair.reference_resistivity_ratio / pair.resistivity_ratio(law.temps_c[k]);
            // (A slot outside the set's range, or a cut cell: a fresh one.)
            let mut scratch = [f64::NAN; NODES];
            let shared = usize::try_from(slot_of(k) - first)
                .ok()
                .filter(|_| full)
                .and_then(|i| known.get_mut(i));
            let cell_speeds = match shared {
                Some(slot) => slot,
                None => &mut scratch,
            };
            let mut total = 0.0;
            for (i, w) in b.windows(2).enumerate() {
                let (p, q) = (w[0].max(lo), w[1].min(hi));
                if q - p <= 0.0 {
                    continue;
                }
                let rule: &[(f64, f64)] = if i == 1 { &GAUSS4 } else { &GAUSS3 };
                let (mid, half) = (0.5 * (p + q), 0.5 * (q - p));
                let mut sum = 0.0;
                for (j, &(xi, wt)) in rule.iter().enumerate() {
                    let x = mid + half * xi;
                    let len = ov.length_within_m(x, c0, c1);
                    if len > 0.0 {
                        let v = &mut cell_speeds[FIRST_NODE[i] + j];
                        if v.is_nan() {
                            *v = speeds.speed_at(x);
                        }
                        sum += wt * pair.force_per_m_at_sigma(*v, sigma).abs() * len;
                    }
                }
                total += half * sum;
            }
            *e += total;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dynamics::model::active_pairs;
    use crate::dynamics::{simulate_case, BrakeTables, RunOptions, Sampling};
    use crate::thermal::pass::{uniform_states, FinState, DEFAULT_CELL_M};

    /// The reference method (the one this module replaces): ∫ f(x)·overlap(x) |dx| over the
    /// front's move from `xa` to `xb` for cell [c0, c1], with f linear from `fa` to `fb` and the
    /// overlap integrated exactly between its breaks (Simpson's rule is exact for the product of
    /// two linear functions).
    fn interval_cell_energy(
        pair: &ActivePair,
        (c0, c1): (f64, f64),
        (xa, xb): (f64, f64),
        (fa, fb): (f64, f64),
    ) -> f64 {
        let (lo, hi) = if xa <= xb { (xa, xb) } else { (xb, xa) };
        if hi - lo <= 0.0 {
            return 0.0;
        }
        let overlap = &pair.spec.overlap;
        let (cell, element) = (overlap.kinks_at(c0, c1), overlap.kinks());
        let mut breaks: Vec<f64> = [lo, hi].into_iter().chain(cell).chain(element).collect();
        for b in breaks.iter_mut().skip(2) {
            *b = b.clamp(lo, hi);
        }
        breaks.sort_by(f64::total_cmp);
        let f_at = |x: f64| fa + (fb - fa) * (x - xa) / (xb - xa);
        let g = |x: f64| f_at(x) * overlap.length_within_m(x, c0, c1);
        breaks
            .windows(2)
            .filter(|w| w[1] > w[0])
            .map(|w| (w[1] - w[0]) * (g(w[0]) + 4.0 * g(0.5 * (w[0] + w[1])) + g(w[1])) / 6.0)
            .sum()
    }

    fn tower() -> crate::scenario::Scenario {
        crate::scenario::shipped("scenarios/tower-catch-brake.yaml")
    }

    /// The reference itself: splitting the overlap at cell boundaries is a partition, so with a
    /// constant or linear force per metre the cell energies of a move add up to ∫ f·overlap dx,
    /// here against a 200 000-point midpoint quadrature of the pair's overlap. Tolerance 1e-9
    /// relative.
    #[test]
    fn reference_cells_partition_the_pair_energy() {
        let s = tower();
        let tables = BrakeTables::build(&s).expect("tables");
        let pairs = active_pairs(&s, &tables, &s.cases[0]);
        let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == 0).collect();
        let FinState::Field(field) = uniform_states(&s, 20.0, DEFAULT_CELL_M).remove(0) else {
            panic!("track fin")
        };
        for (xa, xb, fa, fb) in [
            (34.3, 34.47, 100.0, 100.0),
            (40.0, 40.3, 50.0, 80.0),
            (57.9, 58.6, 30.0, 10.0),
            (45.2, 45.0, 20.0, 20.0),
        ] {
            let mut cells = 0.0;
            for pair in &mine {
                for k in 0..field.temps_c.len() {
                    let c0 = field.start_m + k as f64 * field.cell_m;
                    cells +=
                        interval_cell_energy(pair, (c0, c0 + field.cell_m), (xa, xb), (fa, fb));
                }
            }
            let n = 200_000;
            let h = (xb - xa) / n as f64;
            let direct: f64 = (0..n)
                .map(|i| {
                    let x = xa + (i as f64 + 0.5) * h;
                    let f = fa + (fb - fa) * (x - xa) / (xb - xa);
                    mine.iter()
                        .map(|q| f * q.spec.overlap.length_m(x))
                        .sum::<f64>()
                        * h.abs()
                })
                .sum();
            assert!(
                (cells - direct).abs() <= 1e-9 * direct.abs().max(1.0),
                "{xa}..{xb}: {cells} vs {direct}"
            );
        }
    }

    /// The Gauss–Legendre cell energies of the tower demo's first pass against the reference
    /// method on a fine path: 256 points per integrator step from the same dense output, f from
    /// the force law at each point and the overlap exact in between (its error falls with the
    /// square of the spacing: the reference's cells add up to the fin energy to 3e-10 here, and
    /// a cell is off by up to ~1e-8). Every cell agrees to 5e-8 of the largest cell energy, and
    /// the Gauss cells add up to the fin energy the integrator carries to 1e-9 (the method they
    /// replace, linear f between 5 ms samples, was off by up to 1e-5).
    #[test]
    fn gauss_cells_against_a_fine_reference() {
        let s = tower();
        let tables = BrakeTables::build(&s).expect("tables");
        let case = &s.cases[0];
        let states = uniform_states(&s, case.fin_temp_c, DEFAULT_CELL_M);
        let options = crate::thermal::start_from_states(
            &states,
            case,
            RunOptions {
                sampling: Sampling::ZoneOnly,
                trajectory: true,
                ..RunOptions::default()
            },
        );
        let run = simulate_case(&s, &tables, case, &options).expect("runs");
        let pairs = active_pairs(&s, &tables, case);
        let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == 0).collect();
        let FinState::Field(field) = &states[0] else {
            panic!("track fin")
        };
        let gauss = PathNodes::new(&run.trajectory).cell_energies(&mine, field);
        let mut reference = vec![0.0; gauss.len()];
        for step in &run.trajectory {
            let m = 256;
            let point = |j: usize| {
                let th = step.theta_end * j as f64 / m as f64;
                (step.position_at(th), step.speed_at(th))
            };
            for j in 0..m {
                let ((xa, va), (xb, vb)) = (point(j), point(j + 1));
                for pair in &mine {
                    let Some((lo, hi)) = pair.spec.overlap.swept(xa.min(xb), xa.max(xb)) else {
                        continue;
                    };
                    for (k, _, _) in field.cells_touching(lo, hi) {
                        let e = &mut reference[k];
                        let c0 = field.start_m + k as f64 * field.cell_m;
                        let t = field.temps_c[k];
                        let f = (
                            pair.force_per_m_n(va, t).abs(),
                            pair.force_per_m_n(vb, t).abs(),
                        );
                        *e += interval_cell_energy(pair, (c0, c0 + field.cell_m), (xa, xb), f);
                    }
                }
            }
        }
        let largest = reference.iter().copied().fold(0.0, f64::max);
        assert!(largest > 0.0);
        for (k, (g, r)) in gauss.iter().zip(&reference).enumerate() {
            // The section-end factor adds a piecewise-cubic (C¹) dependence on speed that the
            // Gauss rule integrates to a lower order where the curve's pieces join: 1e-6 of the
            // largest cell (a 256-point-per-step reference written here; seen: 1.6e-7).
            assert!((g - r).abs() <= 1e-6 * largest, "cell {k}: {g} vs {r}");
        }
        let sum: f64 = gauss.iter().sum();
        let fin = run.fins[0].energy_j;
        assert!((sum / fin - 1.0).abs() < 1e-9, "{sum} vs {fin}");
    }

    /// The cell energies of one pair without any shared node (each cell's breaks from its own
    /// edges, each node's speed inverted afresh): the computation [`PathNodes`] shares.
    fn unshared_cell_energies(
        path: &[PathStep],
        mine: &[&ActivePair],
        law: &TempField,
    ) -> Vec<f64> {
        let mut energy = vec![0.0; law.temps_c.len()];
        for piece in pieces(path) {
            let mut speeds = PieceSpeeds::new(piece);
            let Some((xa, xb)) = speeds.span_m() else {
                continue;
            };
            let (lo, hi) = (xa.min(xb), xa.max(xb));
            for pair in mine {
                let ov = &pair.spec.overlap;
                let (o, l) = (ov.vehicle_offset_m, ov.vehicle_len_m);
                for (k, e) in energy.iter_mut().enumerate() {
                    let c0 = (law.start_m + k as f64 * law.cell_m).max(ov.track_start_m);
                    let c1 = (law.start_m + (k + 1) as f64 * law.cell_m).min(ov.track_end_m());
                    if c1 <= c0 {
                        continue;
                    }
                    let mut b = [c0 + o, c1 + o, c0 + o + l, c1 + o + l];
                    b.sort_by(f64::total_cmp);
                    let mut total = 0.0;
                    for (i, w) in b.windows(2).enumerate() {
                        let (p, q) = (w[0].max(lo), w[1].min(hi));
                        if q - p <= 0.0 {
                            continue;
                        }
                        let rule: &[(f64, f64)] = if i == 1 { &GAUSS4 } else { &GAUSS3 };
                        let (mid, half) = (0.5 * (p + q), 0.5 * (q - p));
                        let sum: f64 = rule
                            .iter()
                            .map(|&(xi, wt)| {
                                let x = mid + half * xi;
                                let len = ov.length_within_m(x, c0, c1);
                                let v = speeds.speed_at(x);
                                wt * pair.force_per_m_n(v, law.temps_c[k]).abs() * len
                            })
                            .sum();
                        total += half * sum;
                    }
                    *e += total;
                }
            }
        }
        energy
    }

    /// Sharing the nodes' speeds among the pairs of both fins gives the cell energies of the
    /// unshared computation to rounding (the shared nodes of units a whole number of cells
    /// apart lie within ~1e-15 m of each other; every cell within 1e-13 of its value, seen:
    /// 2e-15): an N−1 case of the tower demo (one unit out on the east face, so the fins
    /// differ), second pass (the cells at different temperatures), every cell of both fins.
    /// The units of both faces, 14 cells apart, share one node set per piece.
    #[test]
    fn shared_node_speeds_match_the_unshared_computation() {
        let s = tower();
        let tables = BrakeTables::build(&s).expect("tables");
        let case = s
            .cases
            .iter()
            .find(|c| c.name == "full/without-E-2")
            .expect("an N-1 case");
        let caps = crate::thermal::pass::fin_capacities(&s, &tables).expect("capacities");
        let states = uniform_states(&s, case.fin_temp_c, DEFAULT_CELL_M);
        let first =
            crate::thermal::pass::run_pass_with(&s, &tables, case, &states, true, 5e-3, &caps)
                .expect("first pass");
        let heated: Vec<FinState> = first.fins.iter().map(|f| f.end.clone()).collect();
        let second =
            crate::thermal::pass::run_pass_with(&s, &tables, case, &heated, true, 5e-3, &caps)
                .expect("second pass");
        let path = &second.run.trajectory;
        let pairs = active_pairs(&s, &tables, case);
        let mut nodes = PathNodes::new(path);
        for (fin, state) in heated.iter().enumerate() {
            let FinState::Field(field) = state else {
                panic!("track fin")
            };
            let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == fin).collect();
            let shared = nodes.cell_energies(&mine, field);
            let plain = unshared_cell_energies(path, &mine, field);
            assert!(plain.iter().sum::<f64>() > 0.0);
            for (k, (a, b)) in shared.iter().zip(&plain).enumerate() {
                let off = (a - b).abs() / b.abs().max(f64::MIN_POSITIVE);
                assert!(off <= 1e-13, "fin {fin} cell {k}: {a} vs {b}");
            }
        }
        assert!(nodes.pieces.iter().all(|p| p.sets.len() <= 1));
        assert!(nodes.pieces.iter().any(|p| p.sets.len() == 1));
    }
}
