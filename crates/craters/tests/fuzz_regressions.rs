//! Replays the catalogue fuzz target's inputs (fuzz/fuzz_targets/catalogue_read.rs, steps in
//! fuzz/steps/catalogue_read.rs) on stable:
//! the committed seeds in fuzz/corpus/catalogue_read/ and every input that once failed, kept
//! in tests/fuzz-regressions/catalogue_read/. Each must read or give a typed error, never
//! panic, and the two bad-row modes must agree.

use craters::catalogue::{self, OnBadRow};

#[path = "../../../tests/fuzz-regressions/inputs.rs"]
mod replay;
use replay::inputs;

#[path = "../../../fuzz/steps/catalogue_read.rs"]
mod steps;

#[test]
fn catalogue_fuzz_inputs_read_or_fail_with_a_typed_error() {
    for p in inputs("catalogue_read") {
        let data = std::fs::read(&p).expect("read input");
        if let Err(panic) = std::panic::catch_unwind(|| steps::run(&data)) {
            panic!(
                "{} panicked: {:?}",
                p.display(),
                panic.downcast_ref::<String>()
            );
        }
    }
}

#[test]
fn in_memory_csv_reads_like_the_same_file_on_disk() {
    let text = "lon_deg,lat_deg,diameter_km,name\n180.5,16.0,1.5,a\nx,1,1\n";
    let dir = tempfile::tempdir().expect("tempdir");
    let p = dir.path().join("list.csv");
    std::fs::write(&p, text).expect("write");
    let from_disk = catalogue::read(&p, OnBadRow::Skip).expect("disk");
    let in_memory = catalogue::read_csv_bytes(text.as_bytes(), &p, OnBadRow::Skip).expect("memory");
    assert_eq!(from_disk, in_memory);
    assert_eq!((from_disk.0.len(), from_disk.1.len()), (1, 1));
}
