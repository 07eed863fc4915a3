//! A small ranked survey ready for export, including a crater centred on the antimeridian.

use siting::export::{ExportSet, Provenance};
use siting::{rank, smaa, Criteria, PreparedTable, Ranking, SmaaResult};
use survey::SurveyFile;

use super::{good, survey, with_crater, with_vis};

pub struct Fixture {
    pub survey: SurveyFile,
    pub criteria: Criteria,
    pub table: PreparedTable,
    pub ranking: Ranking,
    pub smaa: SmaaResult,
    pub provenance: Provenance,
}

impl Fixture {
    pub fn new() -> Fixture {
        let mut on_180 = with_crater(good(1, 180.0, 0.0), |c| c.diameter_m = 1500.0);
        // A measured crest with a breach (NaN) in it, 36 azimuths.
        on_180.crater.rim_crest_radius_m = (0..36)
            .map(|k| {
                if (10..13).contains(&k) {
                    f32::NAN
                } else {
                    750.0 + (k % 5) as f32 * 10.0
                }
            })
            .collect();
        let candidates = vec![
            on_180,
            with_crater(good(2, -170.5, 35.0), |c| c.floor_tilt_deg = 3.0),
            with_vis(
                with_crater(good(3, 160.25, -20.0), |c| c.diameter_m = 2600.0),
                |v| v.gc_separation_deg = 20.0,
            ),
            with_crater(good(4, 179.99, 10.0), |c| {
                c.ellipse_major_m = 1400.0;
                c.ellipse_minor_m = 1000.0;
                c.ellipse_azimuth_deg = 30.0;
                c.rim_completeness = 0.7;
            }),
        ];
        let mut unmeasured = good(5, 150.0, 5.0);
        unmeasured.visibility = None;
        let mut all = candidates;
        all.push(unmeasured);
        let survey = survey(all);
        let criteria = Criteria::default_reflector();
        let table = PreparedTable::new(&survey, &criteria).expect("table");
        let ranking = rank(&table, &criteria).expect("rank");
        let smaa = smaa(&table, &criteria).expect("smaa");
        let provenance = Provenance::new(
            &survey,
            siting::criteria::DEFAULT_REFLECTOR_TOML,
            "2025-01-02T03:04:05Z",
        );
        Fixture {
            survey,
            criteria,
            table,
            ranking,
            smaa,
            provenance,
        }
    }

    pub fn set(&self) -> ExportSet<'_> {
        ExportSet {
            survey: &self.survey,
            criteria: &self.criteria,
            table: &self.table,
            ranking: &self.ranking,
            smaa: Some(&self.smaa),
            provenance: &self.provenance,
            limit: None,
            decisions: None,
            areas: &[],
            only: None,
        }
    }
}
