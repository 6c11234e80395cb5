//! The passes after growth run a slice at a time for the page (`Simulation::reshape_step`):
//! what they have done so far, per sweep, and the progress the page shows between slices.

use ramulus_core::reconnection::LoopProgress;
use ramulus_core::reshaping::{ReshapeProgress, Reshaping};
use ramulus_core::run::{Conducted, RunView};
use ramulus_draw::format::{grouped, significant_digits};
use serde_json::{json, Value};

/// Nodes (channel energy) or junctions a slice takes between looks at the clock: the sweep
/// that costs most per node (the first channel energy sweep, about 45 us a node on the 2 ha
/// demo field) takes about 12 ms for these, so Stop answers within a slice.
pub const ITEMS_PER_PART: usize = 256;

/// Work (`LoopClosing::advance` units: nodes walked and searched) of the loop pass's first
/// part; later parts follow the clock (`reconnection::next_part_size`).
pub const FIRST_LOOP_PART: usize = 4096;

/// What the loop pass took, slice by slice (for the page benchmark).
#[derive(Clone, Copy, Debug, Default)]
pub struct LoopFigures {
    /// Milliseconds of the slice that ran the conducting pass and set the loop pass up.
    pub setup_ms: f64,
    /// Slices that closed loops.
    pub slices: u32,
    /// Milliseconds of those slices, added up.
    pub ms: f64,
    /// Milliseconds of the longest of them.
    pub longest_slice_ms: f64,
}

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
    /// The pipeline after the sweeps, its loop pass in progress (`reconnect` set), once a
    /// slice has set it up; the view takes it.
    pub loops: Option<Conducted>,
    /// What the loop pass took.
    pub loop_figures: LoopFigures,
    /// Work of the loop pass's next part (`FIRST_LOOP_PART` at first).
    pub loop_part: usize,
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
    /// done, stopped, stoppable, loops, setup_ms, finish_ms, log: [{pass, sum, moved, ms}],
    /// loop: {level, levels, ends_done, ends, loops} or null, loop_figures}`; `stage` is
    /// `start` (nothing run yet), `sweeping`, `loops` (closing loops: `loop` says where, the
    /// level counted from 1), `finishing` (the passes after them are next) or `done`;
    /// `stoppable` is true while a Stop stops something (the sweeps; loops run to the end). With `view`, the figures are the finished view's.
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
        let loop_progress = self
            .loops
            .as_ref()
            .filter(|_| view.is_none())
            .and_then(Conducted::loop_progress)
            .filter(|progress| !progress.done);
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
            (None, None) => {
                let stage = match (&loop_progress, self.started) {
                    (Some(_), _) => "loops",
                    (None, true) => "finishing",
                    (None, false) => "start",
                };
                // The sweeps' figures, once the loops follow them.
                let last = self.log.last();
                (
                    stage,
                    last.map_or("done", |figure| figure.pass),
                    self.log
                        .iter()
                        .filter(|figure| Some(figure.pass) == last.map(|l| l.pass))
                        .count() as u32,
                    0,
                    0.0,
                    last.map_or(0.0, |figure| figure.sum),
                    last.map_or(0, |figure| figure.moved),
                )
            }
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
            .or_else(|| {
                self.loops
                    .as_ref()
                    .and_then(|loops| loops.reshaped().energy.as_ref())
            })
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
            loop_progress,
            loops_closed: view
                .and_then(|view| view.loops.as_ref())
                .map_or(0, |loops| loops.reconnection.links.len()),
        });
        let loop_json = loop_progress.map(|progress| {
            json!({
                "level": progress.level + 1,
                "levels": progress.levels,
                "ends_done": progress.ends_done,
                "ends": progress.ends,
                "loops": progress.loops,
            })
        });
        let figures = self.loop_figures;
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
            "loop": loop_json,
            "stoppable": stage == "sweeping",
            "loop_figures": (figures.slices > 0).then(|| json!({
                "setup_ms": figures.setup_ms,
                "slices": figures.slices,
                "ms": figures.ms,
                "longest_slice_ms": figures.longest_slice_ms,
            })),
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
    /// Where the loop pass stands while it runs.
    loop_progress: Option<LoopProgress>,
    /// Loops closed, once the passes are done.
    loops_closed: usize,
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
        "loops" => {
            let progress = s.loop_progress.unwrap_or(LoopProgress {
                level: 0,
                levels: 1,
                ends_done: 0,
                ends: 0,
                loops: 0,
                work: 0,
                done: false,
            });
            let (what, ends) = if s.site {
                ("closing channel loops", "channel dead ends")
            } else {
                ("closing vein loops", "free vein ends")
            };
            let figures = format!(
                "{what}: level {} of {}, {} of {} {ends}, {} loop{} closed so far, drawn in \
                 magenta as they close (loops run to the end once started)\u{2026}",
                progress.level + 1,
                progress.levels,
                grouped(progress.ends_done as u64),
                grouped(progress.ends as u64),
                grouped(progress.loops as u64),
                if progress.loops == 1 { "" } else { "s" },
            );
            if s.sweep == 0 && !s.stopped {
                let mut figures = figures;
                figures[..1].make_ascii_uppercase();
                figures
            } else {
                format!("Sweeps over{stopped}; {figures}")
            }
        }
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
                    format!(" {}", vein_loops_closed(s.loops_closed))
                } else {
                    String::new()
                };
                format!("Stopped during sweep {sweep}, which was taken back: {kept}.{loops}")
            }
            _ if s.loops && !s.site => vein_loops_closed(s.loops_closed),
            _ => String::new(),
        },
    }
}

/// `23,112 vein loops closed.`, or that none closed.
fn vein_loops_closed(count: usize) -> String {
    match count {
        0 => "No vein loop closed.".to_string(),
        1 => "1 vein loop closed.".to_string(),
        _ => format!("{} vein loops closed.", grouped(count as u64)),
    }
}
