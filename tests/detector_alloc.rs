//! Reconstruction does not allocate in steady state: a counting global
//! allocator records allocations made by the test thread while it
//! reconstructs events whose buffers have already grown.

use std::alloc::{GlobalAlloc, Layout, System};
use std::cell::Cell;
use std::sync::atomic::{AtomicUsize, Ordering};

use recoil::detector::{Detector, DetectorProfile, Reco};
use recoil::events::{Event, InvisibleSet};
use recoil::kinematics::P4;

struct Counting;

static ALLOCATIONS: AtomicUsize = AtomicUsize::new(0);

thread_local! {
    static COUNTING: Cell<bool> = const { Cell::new(false) };
}

// SAFETY: forwards to the system allocator; the bookkeeping touches only an
// atomic counter and a const-initialised thread-local flag, neither of
// which allocates.
unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        if COUNTING.try_with(Cell::get).unwrap_or(false) {
            ALLOCATIONS.fetch_add(1, Ordering::Relaxed);
        }
        // SAFETY: same contract as the caller's.
        unsafe { System.alloc(layout) }
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        // SAFETY: same contract as the caller's.
        unsafe { System.dealloc(ptr, layout) }
    }
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        if COUNTING.try_with(Cell::get).unwrap_or(false) {
            ALLOCATIONS.fetch_add(1, Ordering::Relaxed);
        }
        // SAFETY: same contract as the caller's.
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

#[global_allocator]
static GLOBAL: Counting = Counting;

mod detector_support;
use detector_support::particle;

#[test]
fn reconstruct_does_not_allocate_in_steady_state() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/recasts/detectors/generic-13tev.toml"
    );
    let profile = DetectorProfile::from_toml_file(std::path::Path::new(path)).unwrap();
    let det = Detector::new(profile, InvisibleSet::standard(), 42);
    let ev = Event {
        weight: 1.0,
        weights: vec![1.0, 0.9, 1.1],
        particles: vec![
            particle(21, -1, P4::new(1000.0, 0.0, 0.0, 1000.0)),
            particle(2, -1, P4::new(800.0, 0.0, 0.0, -800.0)),
            particle(21, 1, P4::from_pt_eta_phi_m(400.0, 0.5, 0.1, 0.0)),
            particle(5, 1, P4::from_pt_eta_phi_m(60.0, 0.6, 0.2, 0.0)),
            particle(1, 1, P4::from_pt_eta_phi_m(90.0, -1.0, 2.5, 0.0)),
            particle(11, 1, P4::from_pt_eta_phi_m(30.0, 0.2, -2.0, 0.0)),
            particle(13, 1, P4::from_pt_eta_phi_m(30.0, 0.2, -1.0, 0.0)),
            particle(52, 1, P4::from_pt_eta_phi_m(300.0, 0.0, 3.0, 0.0)),
            particle(52, 1, P4::from_pt_eta_phi_m(200.0, 1.0, -2.9, 0.0)),
        ],
        ..Event::default()
    };
    let mut out = Reco::default();
    // Warm up: the buffers grow to this event's size.
    for i in 0..10 {
        det.reconstruct(&ev, 0, i, &mut out);
    }
    COUNTING.with(|c| c.set(true));
    for i in 10..1010 {
        det.reconstruct(&ev, 0, i, &mut out);
    }
    COUNTING.with(|c| c.set(false));
    assert_eq!(ALLOCATIONS.load(Ordering::Relaxed), 0);
    assert!(!out.jets.is_empty());
}
