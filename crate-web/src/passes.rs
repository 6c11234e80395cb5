//! The passes after growth run a slice at a time for the page (`Simulation::reshape_step`):
//! what they have done so far, per sweep, and the progress the page shows between slices.

use ramulus_core::reshaping::{ReshapeProgress, Reshaping};
use ramulus_core::run::RunView;
use ramulus_draw::format::significant_digits;
use serde_json::{json, Value};

/// Nodes (channel energy) or junctions a slice takes between looks at the clock: the sweep
/// that costs most per node (the first channel energy sweep, about 45 us a node on the 2 ha
/// demo field) takes about 12 ms for these, so Stop answers within a slice.
pub const ITEMS_PER_PART: usize = 256;

/// One whole sweep as the page lists it.
#[derive(Clone, Debug)]
pub struct SweepFigure {
    /// `energy` (channel energy, `E = sum Q^0.5 L`) or `junctions` (`sum q^alpha L`).
    pub pass: &'static str,
    /// The pass's sum after the sweep.
    pub sum: f64,
    /// Nodes re-pointed or junctions moved in the sweep.
    pub moved: usize,
    /// Milliseconds the sweep took (its parts added up).
    pub ms: f64,
}

/// The page's stepwise passes of one run.
#[derive(Default)]
pub struct StepwisePasses {
    /// Whether the page runs the passes itself (else the view runs them when first asked).
    pub stepwise: bool,
    /// The passes in progress, once the first slice has started them.
    pub reshaping: Option<Reshaping>,
    /// Every whole sweep so far.
    pub log: Vec<SweepFigure>,
    /// Milliseconds of the slice that set the passes up (forest view, search grids).
    pub setup_ms: f64,
    /// Milliseconds of the last slice (the passes after the sweeps: loops, widths, readings).
    pub finish_ms: f64,
    /// Whether the user stopped the sweeps.
    pub stopped: bool,
    /// The sweep the user stopped midway, which was taken back.
    pub taken_back: Option<u32>,
    /// Milliseconds of the sweep in progress so far.
    pub sweep_ms: f64,
    /// Whether the first slice has run.
    pub started: bool,
}

impl StepwisePasses {
    /// Forgets a run's passes (a reset run grows again).
    pub fn forget(&mut self) {
        let stepwise = self.stepwise;
        *self = StepwisePasses {
            stepwise,
            ..StepwisePasses::default()
        };
    }

    /// Takes the passes in progress (the view ends them).
    pub fn take(&mut self) -> Option<Reshaping> {
        self.reshaping.take()
    }

    /// The progress as JSON for the page: `{text, stage, pass, sweep, sweeps, before, now, moved,
    /// done, stopped, loops, setup_ms, finish_ms, log: [{pass, sum, moved, ms}]}`; `stage` is
    /// `start` (nothing run yet), `sweeping`, `finishing` (the sweeps are over, the passes
    /// after them are next) or `done`. With `view`, the figures are the finished view's.
    /// `text` is the status line to show (drainage words on a `site`, leaf words otherwise).
    pub fn progress_json(&self, view: Option<&RunView>, loops: bool, site: bool) -> String {
        let progress: Option<ReshapeProgress> = self
            .reshaping
            .as_ref()
            .map(|reshaping| reshaping.progress());
        let (part, part_of, part_moved) = match (view, progress) {
            (None, Some(progress)) if !progress.done => {
                (progress.part, progress.part_of, progress.part_moved)
            }
            _ => (0, 0, 0),
        };
        let (stage, pass, sweep, sweeps, before, now, moved) = match (view, progress) {
            (Some(view), _) => {
                let last = self.log.last().map_or(0, |figure| figure.moved);
                match (&view.relaxation, &view.energy) {
                    (Some(relaxation), _) => (
                        "done",
                        "junctions",
                        relaxation.sweeps,
                        relaxation.sweeps,
                        relaxation.cost_before,
                        relaxation.cost_after,
                        last,
                    ),
                    (None, Some(energy)) => (
                        "done",
                        "energy",
                        energy.sweeps.len() as u32,
                        energy.sweeps.len() as u32,
                        energy.energy_before,
                        energy.energy_after,
                        last,
                    ),
                    (None, None) => ("done", "done", 0, 0, 0.0, 0.0, 0),
                }
            }
            (None, Some(progress)) => (
                if progress.done {
                    "finishing"
                } else {
                    "sweeping"
                },
                progress.pass.name(),
                progress.sweep,
                progress.sweeps,
                progress.before,
                progress.now,
                progress.moved,
            ),
            (None, None) if self.started => ("finishing", "done", 0, 0, 0.0, 0.0, 0),
            (None, None) => ("start", "done", 0, 0, 0.0, 0.0, 0),
        };
        let log: Vec<Value> = self
            .log
            .iter()
            .map(|figure| {
                json!({
                    "pass": figure.pass,
                    "sum": figure.sum,
                    "moved": figure.moved,
                    "ms": figure.ms,
                })
            })
            .collect();
        // The energy figures of the channel energy pass, also once the junctions follow it.
        let energy = view
            .and_then(|view| view.energy.as_ref())
            .or_else(|| self.reshaping.as_ref().and_then(|r| r.energy()))
            .map(|energy| json!({"before": energy.energy_before, "after": energy.energy_after}));
        let text = status_text(&Status {
            stage,
            pass,
            sweep,
            sweeps,
            before,
            now,
            moved,
            part,
            part_of,
            part_moved,
            stopped: self.stopped,
            taken_back: self.taken_back,
            loops,
            site,
        });
        json!({
            "text": text,
            "stage": stage,
            "pass": pass,
            "sweep": sweep,
            "sweeps": sweeps,
            "before": before,
            "now": now,
            "moved": moved,
            "part": part,
            "part_of": part_of,
            "part_moved": part_moved,
            "done": stage == "done",
            "stopped": self.stopped,
            "taken_back": self.taken_back,
            "loops": loops,
            "setup_ms": self.setup_ms,
            "finish_ms": self.finish_ms,
            "energy": energy,
            "log": log,
        })
        .to_string()
    }
}

/// The figures a status line is made of.
struct Status<'a> {
    stage: &'a str,
    pass: &'a str,
    sweep: u32,
    sweeps: u32,
    before: f64,
    now: f64,
    moved: usize,
    part: usize,
    part_of: usize,
    part_moved: usize,
    stopped: bool,
    taken_back: Option<u32>,
    loops: bool,
    site: bool,
}

/// `before -> now (-x.xx %)`, five significant digits.
fn sums(before: f64, now: f64) -> String {
    let change = if before > 0.0 {
        100.0 * (now - before) / before
    } else {
        0.0
    };
    format!(
        "{} \u{2192} {} ({}{:.2} %)",
        significant_digits(before, 5),
        significant_digits(now, 5),
        if change <= 0.0 { "\u{2212}" } else { "+" },
        change.abs()
    )
}

/// The status line of the passes after growth: drainage words on a site (channel energy,
/// sweeps, outlets), leaf words on a leaf (vein junctions, loops).
fn status_text(s: &Status) -> String {
    let what = match (s.pass, s.site) {
        ("energy", true) => "Channel energy E = \u{3a3} Q^0.5 L",
        ("energy", false) => "Network energy E = \u{3a3} Q^0.5 L",
        ("junctions", true) => "Channel junction cost \u{3a3} q^\u{3b1} L",
        _ => "Vein junction cost \u{3a3} q^\u{3b1} L",
    };
    let moved = match (s.pass, s.site) {
        ("energy", true) => "drainage paths re-pointed toward the outlets",
        ("energy", false) => "nodes re-pointed",
        ("junctions", true) => "channel junctions moved",
        _ => "vein junctions moved",
    };
    let stopped = match (s.stopped, s.taken_back) {
        (false, _) => String::new(),
        (true, Some(part_run)) => format!(
            " (stopped during sweep {part_run}, which was taken back: {} whole sweep{} kept)",
            s.sweep,
            if s.sweep == 1 { "" } else { "s" }
        ),
        (true, None) => format!(" (stopped after sweep {})", s.sweep),
    };
    match s.stage {
        "start" => {
            if s.site {
                "Setting up the channel energy sweeps\u{2026}".to_string()
            } else {
                "Setting up the passes after growth\u{2026}".to_string()
            }
        }
        "sweeping" if s.part > 0 => {
            let last = if s.sweep > 0 {
                format!(" ({} in sweep {})", s.moved, s.sweep)
            } else {
                String::new()
            };
            format!(
                "{what}, sweep {} of {} ({} % through): {}; {} {moved} so far in this \
                 sweep{last}.",
                s.sweep + 1,
                s.sweeps,
                (100 * s.part) / s.part_of.max(1),
                sums(s.before, s.now),
                s.part_moved,
            )
        }
        "sweeping" => format!(
            "{what}, sweep {} of {}: {}; {} {moved} in the last sweep.",
            s.sweep,
            s.sweeps,
            sums(s.before, s.now),
            s.moved
        ),
        "finishing" => {
            let next = match (s.site, s.loops) {
                (true, _) => "measuring the channels",
                (false, true) => "closing vein loops",
                (false, false) => "measuring the veins",
            };
            if s.sweep == 0 && !s.stopped {
                let mut next = next.to_string();
                next[..1].make_ascii_uppercase();
                format!("{next}\u{2026}")
            } else {
                format!("Sweeps over{stopped}; {next}\u{2026}")
            }
        }
        _ => match s.pass {
            "energy" | "junctions" => format!(
                "{what}: {} over {} sweep{}{stopped}.",
                sums(s.before, s.now),
                s.sweep,
                if s.sweep == 1 { "" } else { "s" }
            ),
            _ if s.stopped => {
                let kept = if s.site {
                    "the channels stay as grown"
                } else {
                    "the vein junctions stay where they grew"
                };
                let sweep = s.taken_back.unwrap_or(1);
                let loops = if s.loops && !s.site {
                    " Vein loops closed."
                } else {
                    ""
                };
                format!("Stopped during sweep {sweep}, which was taken back: {kept}.{loops}")
            }
            _ if s.loops && !s.site => "Vein loops closed.".to_string(),
            _ => String::new(),
        },
    }
}
