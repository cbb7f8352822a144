//! Recovery: invented trial series generated from known constants with known noise are fitted
//! back, and the 95 % profile-likelihood intervals cover the truth in about 95 % of the
//! repetitions. The observed coverage is printed (run with `--nocapture`) and recorded in
//! docs/theory.md §15.3.

use oblique_confidence::fit::{fit, synthetic_trials, FitSettings, SyntheticDesign};
use oblique_confidence::priors::Constant;

const REPETITIONS: usize = 200;
const TRUTH: [f64; 3] = [0.8, 0.13, 5.0];

#[test]
fn intervals_cover_the_truth_in_about_95_percent_of_repetitions() {
    let lib = oblique_window::Library::load(&[]).expect("library");
    let demo = lib.pair("demo-al6061-on-cu").expect("demo");
    let threads = 2;
    let results: Vec<Vec<(Constant, bool, bool)>> = std::thread::scope(|s| {
        let handles: Vec<_> = (0..threads)
            .map(|t| {
                s.spawn(move || {
                    let mut out = Vec::new();
                    for rep in (t..REPETITIONS).step_by(threads) {
                        // 60 shots over the region a magnetic-pulse series would cover, with
                        // 3 % velocity and 1 deg angle noise (invented, seeded per repetition).
                        let w = synthetic_trials(
                            demo,
                            &SyntheticDesign {
                                truth: TRUTH,
                                shots: 60,
                                velocity_m_s: (250.0, 900.0),
                                angle_deg: (2.0, 30.0),
                                sd_velocity_relative: 0.03,
                                sd_angle_deg: 1.0,
                                seed: 1000 + rep as u64,
                            },
                        )
                        .expect("trials");
                        let r = fit(&w, &FitSettings::default()).expect("fit");
                        out.push(
                            r.constants
                                .iter()
                                .map(|c| {
                                    let truth = TRUTH[match c.constant {
                                        Constant::DeribasK => 0,
                                        Constant::WittmanN => 1,
                                        _ => 2,
                                    }];
                                    let covers = c.low.is_none_or(|l| l <= truth)
                                        && c.high.is_none_or(|h| truth <= h);
                                    (c.constant, covers, c.bounded)
                                })
                                .collect(),
                        );
                    }
                    out
                })
            })
            .collect();
        handles
            .into_iter()
            .flat_map(|h| h.join().expect("worker"))
            .collect()
    });
    assert_eq!(results.len(), REPETITIONS);
    for c in [Constant::DeribasK, Constant::WittmanN] {
        let rows: Vec<(bool, bool)> = results
            .iter()
            .flat_map(|r| r.iter().filter(|x| x.0 == c).map(|x| (x.1, x.2)))
            .collect();
        let covered = rows.iter().filter(|x| x.0).count();
        let bounded = rows.iter().filter(|x| x.1).count();
        let coverage = covered as f64 / rows.len() as f64;
        println!(
            "{}: covered the truth in {covered} of {} repetitions ({:.1} %), bounded on both sides in {bounded}",
            c.key(),
            rows.len(),
            100.0 * coverage
        );
        // 200 repetitions: the binomial standard deviation of a 95 % coverage is 1.5 %; allow
        // about four of them either way.
        assert!(
            (0.89..=0.995).contains(&coverage),
            "{}: {coverage}",
            c.key()
        );
        assert!(bounded > REPETITIONS * 8 / 10, "{}: {bounded}", c.key());
    }
}
