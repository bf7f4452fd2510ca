//! Every core on the command line: sweep steps measured on a pool of threads (rayon), each
//! thread with its own workbench, kept for the whole run so geometry is built once per
//! thread. The library's steps are independent ([`Sweep::measure`]) and recorded in step
//! order, so any number of threads gives the figures one thread gives.

use rayon::prelude::*;
use std::ops::Range;
use std::sync::Mutex;
use twinshade::analysis::{AnalysisError, Measured, Sweep, Workbench};
use twinshade::geometry::Mesh;

/// A pool of threads and one workbench per thread.
pub struct Jobs {
    pool: rayon::ThreadPool,
    benches: Vec<Mutex<Workbench>>,
}

impl Jobs {
    /// `jobs` threads (0: one per core), each with a workbench holding `mesh` when given.
    pub fn new(jobs: usize, mesh: Option<&Mesh>) -> Result<Jobs, String> {
        let threads = if jobs == 0 {
            std::thread::available_parallelism().map_or(1, |n| n.get())
        } else {
            jobs
        };
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .map_err(|e| format!("cannot start {threads} threads: {e}"))?;
        let benches = (0..threads)
            .map(|_| {
                let mut b = Workbench::new();
                if let Some(m) = mesh {
                    b.set_file_mesh(m.clone());
                }
                Mutex::new(b)
            })
            .collect();
        Ok(Jobs { pool, benches })
    }

    /// Threads in the pool.
    pub fn threads(&self) -> usize {
        self.benches.len()
    }

    /// Measures `steps` of `sweep` on the pool, in step order.
    pub fn measure(
        &self,
        sweep: &Sweep,
        steps: Range<u32>,
    ) -> Vec<Result<Measured, AnalysisError>> {
        self.pool.install(|| {
            steps
                .into_par_iter()
                .map(|i| {
                    // Each pool thread has its own workbench; the lock is never contended.
                    let k = rayon::current_thread_index().unwrap_or(0) % self.benches.len();
                    let mut bench = self.benches[k]
                        .lock()
                        .unwrap_or_else(std::sync::PoisonError::into_inner);
                    sweep.measure(&mut bench, i)
                })
                .collect()
        })
    }
}
