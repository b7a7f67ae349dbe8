//! `make bench`, the slowest legal document of each verb: random documents of the
//! property suite's generator (tests/common/domain.rs), each verb timed once per
//! document in-process, natively; the slowest is reported with its seed (replay
//! it with `HALFRAIL_DOMAIN_SEED=<seed> cargo test --test domain print_document --
//! --ignored --nocapture`). Targets: analyze ≤ 1 s, design ≤ 2 s, a spread of 2000
//! trials ≤ 5 s, a 1000-block chain ≤ 1 s.

#[path = "../common/domain.rs"]
mod domain;

use std::time::Instant;

use halfrail::doc::load;
use serde_json::{json, Value};

/// Documents drawn per verb (`HALFRAIL_BENCH_DOCS`); the spread, the slowest verb,
/// on a quarter of them.
fn documents() -> u64 {
    std::env::var("HALFRAIL_BENCH_DOCS").ok().and_then(|v| v.parse().ok()).unwrap_or(200)
}

const FIRST_SEED: u64 = 0xbe_0000;

struct Slowest {
    verb: &'static str,
    target_s: f64,
    seconds: f64,
    seed: Option<u64>,
    timed: usize,
}

impl Slowest {
    fn new(verb: &'static str, target_s: f64) -> Self {
        Slowest { verb, target_s, seconds: 0.0, seed: None, timed: 0 }
    }

    /// Times `f` on the document of `seed` (answers and refusals alike: a refusal
    /// that takes long is as slow for the user).
    fn time<T>(&mut self, seed: u64, f: impl FnOnce() -> T) {
        let start = Instant::now();
        std::hint::black_box(f());
        let seconds = start.elapsed().as_secs_f64();
        self.timed += 1;
        if seconds > self.seconds {
            self.seconds = seconds;
            self.seed = Some(seed);
        }
    }

    fn print(&self) {
        let verdict = if self.seconds <= self.target_s { "met" } else { "MISSED" };
        let seed = self.seed.map_or("-".to_string(), |s| s.to_string());
        println!(
            "slowest {:<24} {:>10.1} ms  ≤ {:>6.0} ms  {verdict}  (seed {seed}, of {} documents)",
            self.verb,
            self.seconds * 1e3,
            self.target_s * 1e3,
            self.timed
        );
    }
}

fn main() {
    let count = documents();
    let mut analyze = Slowest::new("analyze", 1.0);
    let mut design = Slowest::new("design", 2.0);
    let mut spread = Slowest::new("spread (2000 trials)", 5.0);
    let mut chain = Slowest::new("chain (1000 blocks)", 1.0);
    for seed in FIRST_SEED..FIRST_SEED + count {
        let mut doc: Value = domain::draw(seed).doc;
        doc["tolerance"]["trials"] = json!(2000);
        // 1000 blocks: runs of stages as long as the format allows, pads between.
        let stages = doc["part"]["stages"].as_u64().unwrap_or(1) as u32;
        let run = halfrail::doc::max_run_stages(stages);
        let blocks: Vec<Value> = (0..1000).map(|i| if i % (run + 1) == run { json!({"kind": "pad", "loss_db": 1}) } else { json!({"kind": "stage"}) }).collect();
        doc["chain"]["blocks"] = json!(blocks);
        let Ok(d) = load(&doc.to_string()) else { continue };
        analyze.time(seed, || {
            let _ = d.bias();
            let _ = d.stability();
            let _ = d.compensation();
            let _ = d.large(halfrail::analysis::swing::Curve::Skipped, &mut |_| {});
        });
        design.time(seed, || d.design());
        chain.time(seed, || d.chain(None));
        if seed % 4 == 0 {
            spread.time(seed, || d.spread(&mut |_| {}));
        }
    }
    for s in [&analyze, &design, &spread, &chain] {
        s.print();
    }
}
