//! The last few reports, so that going back with undo, or switching between responses, finds the
//! earlier report instead of computing it again.
//!
//! An entry is keyed on the project's revision (see [`crate::project::History`]), the response
//! index and the model settings, so an edit, an undo or another model choice gives a fresh entry
//! while going back to an earlier state reuses the old one. A few entries are kept, most recent
//! first.

use std::sync::Arc;

use super::Report;
use crate::project::{ModelSettings, Project};

/// Entries kept by [`ReportCache`] (a few responses and a few undo steps back).
pub const CACHE_ENTRIES: usize = 8;

/// The last few reports, most recent first.
#[derive(Debug, Default)]
pub struct ReportCache {
    entries: Vec<Arc<Report>>,
    computed: u64,
}

impl ReportCache {
    /// An empty cache.
    pub fn new() -> ReportCache {
        ReportCache::default()
    }

    /// The report of `response` at `revision` with the project's own model settings for it,
    /// built now if not cached. An index past the responses gives a report that says there is no
    /// such response.
    pub fn get(&mut self, project: &Project, revision: u64, response: usize) -> Arc<Report> {
        let model = project
            .responses
            .get(response)
            .map(|r| r.model.clone())
            .unwrap_or_default();
        self.get_with(project, revision, response, &model)
    }

    /// Like [`Self::get`] with other model settings (e.g. trying a model before choosing it).
    pub fn get_with(
        &mut self,
        project: &Project,
        revision: u64,
        response: usize,
        model: &ModelSettings,
    ) -> Arc<Report> {
        let hit = self.entries.iter().position(|a| {
            a.key.revision == revision && a.key.response == response && &a.key.model == model
        });
        let entry = match hit {
            Some(i) => self.entries.remove(i),
            None => {
                self.computed += 1;
                Arc::new(Report::build(project, revision, response, model))
            }
        };
        self.entries.insert(0, Arc::clone(&entry));
        self.entries.truncate(CACHE_ENTRIES);
        entry
    }

    /// How many reports were built (not served from the cache) so far.
    pub fn computed(&self) -> u64 {
        self.computed
    }

    /// Forgets everything (e.g. another project was opened).
    pub fn clear(&mut self) {
        self.entries.clear();
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Edit, History, demo_project};

    #[test]
    fn cache_computes_once_per_key() {
        let mut h = History::new(demo_project());
        let mut cache = ReportCache::new();
        let first = cache.get(h.project(), h.revision(), 0);
        let again = cache.get(h.project(), h.revision(), 0);
        assert!(Arc::ptr_eq(&first, &again));
        assert_eq!(cache.computed(), 1);
        h.apply(Edit::SetCell {
            run: 0,
            response: 0,
            text: "99".into(),
            at: None,
        })
        .unwrap();
        let edited = cache.get(h.project(), h.revision(), 0);
        assert_eq!(cache.computed(), 2);
        assert_eq!(edited.data.as_ref().unwrap().raw.response()[0], Some(99.0));
        assert!(h.undo());
        let back = cache.get(h.project(), h.revision(), 0);
        assert!(Arc::ptr_eq(&first, &back), "undo reuses the earlier result");
        assert_eq!(cache.computed(), 2);
        let other = cache.get(h.project(), h.revision(), 1);
        assert_eq!(other.key.response, 1);
        let tried = ModelSettings {
            terms: vec!["A".into()],
            ..ModelSettings::default()
        };
        cache.get_with(h.project(), h.revision(), 0, &tried);
        assert_eq!(cache.computed(), 4);
        for r in 0..20 {
            cache.get(h.project(), 1000 + r, 0);
        }
        assert_eq!(cache.entries.len(), CACHE_ENTRIES);
    }
}
