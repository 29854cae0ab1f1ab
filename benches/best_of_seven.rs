//! A noise control beside the criterion benchmarks, for comparing two commits on a
//! machine whose load changes: each flowsheet given is loaded once and solved seven
//! times in one process, and the fastest solve is printed with its passes and yield.
//! Run the same build of two commits in turn, several rounds interleaved.
//!
//! Run: `cargo bench --bench best_of_seven -- FLOWSHEET…` (from the project root).

use std::time::Instant;

fn main() {
    let files: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    for path in files {
        let plant = match cryochain::flowsheet::load(std::path::Path::new(&path), &[]) {
            Ok(plant) => plant,
            Err(e) => {
                eprintln!("{path}: {e}");
                continue;
            }
        };
        let mut best = f64::INFINITY;
        let mut last = None;
        for _ in 0..7 {
            let start = Instant::now();
            let solved = cryochain::solve::solve(&plant, &Default::default());
            best = best.min(start.elapsed().as_secs_f64() * 1e3);
            last = Some(solved);
        }
        match last {
            Some(Ok(s)) => println!(
                "{path}: best {best:.2} ms, {} passes, yield {:.12}",
                s.iterations,
                s.summary.liquid_yield.unwrap_or(f64::NAN)
            ),
            Some(Err(e)) => eprintln!("{path}: {e}"),
            None => {}
        }
    }
}
