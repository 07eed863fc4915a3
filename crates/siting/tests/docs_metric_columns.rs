//! docs/siting.md lists every metric column of the exports with the label a person reads
//! for it: the table there must say what `survey::METRICS` says.

#[test]
fn siting_doc_lists_every_metric_with_its_label_header_and_meaning() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../../docs/siting.md");
    let doc = std::fs::read_to_string(path).expect("docs/siting.md is readable");
    for m in survey::METRICS {
        let start = format!("| `{}` | {} | {} | ", m.name, m.label, m.header());
        let row = doc
            .lines()
            .find(|l| l.starts_with(&start))
            .unwrap_or_else(|| panic!("docs/siting.md has no row starting {start:?}"));
        assert!(
            row.ends_with(&format!("| {} |", m.description)),
            "the row of {} does not end with its meaning: {row}",
            m.name
        );
    }
}
