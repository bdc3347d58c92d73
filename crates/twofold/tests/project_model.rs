//! The project model through its public API: a bench loop from the demo to a saved file, and a
//! crash recovered from the recovery copy.

use std::time::{Duration, Instant};

use twofold_study::project::{
    Edit, History, RecoveryDebouncer, RecoveryStore, RunStatus, demo_project, load_project,
    save_project,
};
use twofold_study::report::ReportCache;

#[test]
fn bench_loop_edit_save_reopen() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("cure.ron");
    let mut h = History::new(demo_project());
    let missing = h
        .project()
        .runs
        .iter()
        .position(|r| !r.values[0].is_typed())
        .unwrap();
    h.apply(Edit::SetCell {
        run: missing,
        response: 0,
        text: "71".into(),
        at: Some("2025-03-05T08:00:00Z".into()),
    })
    .unwrap();
    h.apply(Edit::SetStatus {
        run: 0,
        status: RunStatus::Excluded {
            reason: "panel scratched".into(),
        },
    })
    .unwrap();
    h.apply(Edit::ToggleTerm {
        response: 0,
        term: "C".into(),
    })
    .unwrap();
    assert!(h.is_dirty());
    save_project(&path, h.project()).unwrap();
    h.mark_saved();
    assert!(!h.is_dirty());
    let reopened = load_project(&path).unwrap();
    assert_eq!(&reopened, h.project());

    // The analysis sees the new value, the exclusion and the demo's model A + B + AB with C added.
    let mut cache = ReportCache::new();
    let a = cache.get(h.project(), h.revision(), 0);
    let data = a.data.as_ref().unwrap();
    assert_eq!(data.excluded, vec![0]);
    assert!(data.missing.is_empty());
    let fit = a.fit.as_ref().unwrap();
    assert_eq!(fit.terms.len(), 4);
    assert_eq!(fit.runs.len(), 17);
}

#[test]
fn crash_after_edits_is_recovered() {
    let dir = tempfile::tempdir().unwrap();
    let store = RecoveryStore::in_dir(dir.path().join("user"));
    let path = dir.path().join("cure.ron");
    save_project(&path, &demo_project()).unwrap();

    let mut h = History::new(load_project(&path).unwrap());
    let mut timer = RecoveryDebouncer::default();
    timer.settled(h.revision());
    let t0 = Instant::now();
    h.apply(Edit::SetNote {
        run: 3,
        note: "powder lot 7".into(),
    })
    .unwrap();
    assert!(!timer.poll(h.revision(), t0));
    assert!(timer.poll(h.revision(), t0 + Duration::from_millis(1000)));
    store
        .write(
            Some(&path),
            h.project(),
            h.revision(),
            "2025-03-05T08:01:00Z",
        )
        .unwrap();
    timer.written(h.revision());
    // The program dies here, unsaved. On the next start:
    let offer = store.find(Some(&path)).unwrap().unwrap();
    assert_eq!(offer.project.runs[3].note, "powder lot 7");
    assert_eq!(&offer.project, h.project());
    // The engineer restores it and saves; the copy is then discarded and offers nothing.
    save_project(&path, &offer.project).unwrap();
    store.discard(Some(&path)).unwrap();
    assert_eq!(store.find(Some(&path)).unwrap(), None);
}
