//! Open the workbench without the main binary (screenshots, development):
//! `workbench [FILE] [--select-rank N] [--sheet score|shape|sky|reflector|operations|robustness|numbers|notes] [--compare R1,R2,..] [--rank-probabilities] [--screenshot OUT.png] [--size WxH] [--timing]`
//! `[--map-layer relief|tint|slope] [--hide-failing] [--no-grid] [--no-legend] [--lon360]`
//! `[--study-area FILE] [--keep-out FILE]` (areas added to the criteria at start, margin 0)

use quietbowl_workbench::{run, WorkbenchOptions};
use std::path::PathBuf;

fn main() {
    let mut options = WorkbenchOptions::default();
    let mut args = std::env::args().skip(1);
    while let Some(a) = args.next() {
        match a.as_str() {
            "--select-rank" => options.select_rank = args.next().and_then(|v| v.parse().ok()),
            "--screenshot" => options.screenshot_to = args.next().map(PathBuf::from),
            "--timing" => options.report_first_frame = true,
            "--rank-probabilities" => options.robustness = true,
            "--compare" => {
                options.compare_ranks = args
                    .next()
                    .map(|v| v.split(',').filter_map(|r| r.trim().parse().ok()).collect())
                    .unwrap_or_default()
            }
            "--sheet" => {
                use quietbowl_workbench::crater_sheet::SheetTab;
                options.sheet_tab = match args.next().as_deref() {
                    Some("score") => Some(SheetTab::Score),
                    Some("sky") => Some(SheetTab::Sky),
                    Some("reflector") => Some(SheetTab::Fit),
                    Some("operations") => Some(SheetTab::Operations),
                    Some("robustness") => Some(SheetTab::Robustness),
                    Some("numbers") => Some(SheetTab::Numbers),
                    Some("notes") => Some(SheetTab::Notes),
                    _ => Some(SheetTab::Shape),
                }
            }
            "--map-layer" | "--hide-failing" | "--no-grid" | "--no-legend" => {
                use quietbowl_workbench::shading::MapLayer;
                let m = options.map_settings.get_or_insert_with(Default::default);
                match a.as_str() {
                    "--map-layer" => {
                        m.layer = match args.next().as_deref() {
                            Some("relief") => MapLayer::Relief,
                            Some("slope") => MapLayer::Slope,
                            _ => MapLayer::HeightTint,
                        }
                    }
                    "--hide-failing" => m.show_failing = false,
                    "--no-grid" => m.show_grid = false,
                    _ => m.show_legend = false,
                }
            }
            "--study-area" | "--keep-out" => {
                use siting::areas::Keep;
                let keep = if a == "--keep-out" {
                    Keep::Outside
                } else {
                    Keep::Inside
                };
                if let Some(f) = args.next() {
                    options.areas.push((PathBuf::from(f), keep));
                }
            }
            "--lon360" => options.lon_convention = Some(survey::LonConvention::East360),
            "--size" => {
                options.window_size = args.next().and_then(|v| {
                    let (w, h) = v.split_once('x')?;
                    Some([w.parse().ok()?, h.parse().ok()?])
                })
            }
            _ => options.open = Some(PathBuf::from(a)),
        }
    }
    if options.open.is_none() {
        options.demo_dem = Some(PathBuf::from(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/../../demo-terrain/farside-patch.tif"
        )));
    }
    if let Err(e) = run(options) {
        eprintln!("workbench: {e}");
        std::process::exit(1);
    }
}
