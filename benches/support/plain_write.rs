//! The floor of an export: the same number of bytes written in 64 KiB pieces
//! to a new file and synced, with nothing of tankwalk in the way.

use std::io::Write;
use std::path::Path;
use std::time::{Duration, Instant};

/// Writes `bytes` bytes to a new file at `path`, syncs it, removes it and
/// returns how long the write and sync took.
pub fn plain_write(path: &Path, bytes: u64) -> Duration {
    let chunk = vec![b'x'; 64 * 1024];
    let started = Instant::now();
    let mut file = std::io::BufWriter::with_capacity(1 << 16, std::fs::File::create(path).unwrap());
    let mut left = bytes;
    while left > 0 {
        let n = left.min(chunk.len() as u64) as usize;
        file.write_all(&chunk[..n]).unwrap();
        left -= n as u64;
    }
    file.into_inner().unwrap().sync_all().unwrap();
    let took = started.elapsed();
    std::fs::remove_file(path).unwrap();
    took
}
