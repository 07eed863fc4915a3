//! Catalogue seeds from GeoJSON and other OGR formats, checked against geometry computed by hand;
//! and the CSV dialects spreadsheets write, checked against RFC 4180 (Shafranovich 2005).

mod common;
use craters::catalogue::{self, OnBadRow};

#[test]
fn geojson_points_and_polygons_give_centres_and_equal_area_diameters() {
    // A polygon approximating a circle of 10 km diameter around (180, 16), built in the local
    // frame: its equal-area diameter is that of the 256-gon, 10 km * sqrt(sin(2pi/256)*256/(2pi)).
    let n = 256;
    let ring: Vec<String> = (0..=n)
        .map(|i| {
            let t = i as f64 / n as f64 * std::f64::consts::TAU;
            let (lon, lat) = common::lonlat(180.0, 16.0, 5000.0 * t.cos(), 5000.0 * t.sin());
            format!("[{lon:.9},{lat:.9}]")
        })
        .collect();
    let gj = format!(
        r#"{{"type":"FeatureCollection","features":[
        {{"type":"Feature","properties":{{"name":"P","diameter_km":2.5}},"geometry":{{"type":"Point","coordinates":[-179.5,16.1]}}}},
        {{"type":"Feature","properties":{{"name":"Q"}},"geometry":{{"type":"Polygon","coordinates":[[{}]]}}}},
        {{"type":"Feature","properties":{{"name":"R"}},"geometry":{{"type":"Point","coordinates":[10,10]}}}},
        {{"type":"Feature","properties":{{"name":"S"}},"geometry":{{"type":"LineString","coordinates":[[0,0],[1,1]]}}}}
        ]}}"#,
        ring.join(",")
    );
    let dir = tempfile::tempdir().expect("tempdir");
    let p = dir.path().join("seeds.geojson");
    std::fs::write(&p, gj).expect("write");
    let (rows, problems) = catalogue::read(&p, OnBadRow::Skip).expect("read");
    assert_eq!(rows.len(), 2, "{rows:?} {problems:?}");
    assert_eq!((rows[0].line, rows[0].name.as_deref()), (1, Some("P")));
    assert!((rows[0].diameter_m - 2500.0).abs() < 1e-9 && (rows[0].lon_deg + 179.5).abs() < 1e-12);
    let want = 10_000.0
        * ((std::f64::consts::TAU / n as f64).sin() * n as f64 / std::f64::consts::TAU).sqrt();
    assert!(
        (rows[1].diameter_m - want).abs() < 0.5,
        "{} vs {want}",
        rows[1].diameter_m
    );
    assert!(common::dist((rows[1].lon_deg, rows[1].lat_deg), (180.0, 16.0)) < 1.0);
    assert_eq!(
        problems.iter().map(|p| p.line).collect::<Vec<_>>(),
        vec![3, 4]
    );
}

#[test]
fn geopackage_written_by_ogr_reads_the_same_as_csv() {
    // Written with GDAL's own vector API, so this checks the reader on a second OGR format.
    use gdal::vector::{FieldDefn, Geometry, LayerAccess, LayerOptions, OGRFieldType};
    let dir = tempfile::tempdir().expect("tempdir");
    let p = dir.path().join("seeds.gpkg");
    {
        let drv = gdal::DriverManager::get_driver_by_name("GPKG").expect("GPKG driver");
        let mut ds = drv.create_vector_only(&p).expect("create");
        let layer = ds
            .create_layer(LayerOptions {
                name: "craters",
                ty: gdal::vector::OGRwkbGeometryType::wkbPoint,
                ..Default::default()
            })
            .expect("layer");
        FieldDefn::new("diameter_m", OGRFieldType::OFTReal)
            .expect("field")
            .add_to_layer(&layer)
            .expect("add");
        let g = Geometry::from_wkt("POINT (179.75 15.5)").expect("wkt");
        let mut f = gdal::vector::Feature::new(layer.defn()).expect("feature");
        f.set_geometry(g).expect("geometry");
        f.set_field_double(0, 4200.0).expect("field");
        f.create(&layer).expect("create");
    }
    let (rows, problems) = catalogue::read(&p, OnBadRow::Stop).expect("read");
    assert!(problems.is_empty());
    assert_eq!(rows.len(), 1);
    assert!(
        (rows[0].lon_deg - 179.75).abs() < 1e-9
            && (rows[0].lat_deg - 15.5).abs() < 1e-9
            && rows[0].diameter_m == 4200.0
    );
}

fn csv(text: &[u8]) -> (Vec<catalogue::CatalogueRow>, Vec<catalogue::RowProblem>) {
    catalogue::read_csv_bytes(text, "list.csv", OnBadRow::Skip).expect("read")
}

#[test]
fn csv_quoted_field_may_span_lines_per_rfc_4180() {
    // RFC 4180 section 2, rules 6 and 7: a field in double quotes may hold line breaks, commas
    // and doubled quotes. The row is numbered by the line it starts on.
    let text = "lon_deg,lat_deg,diameter_km,name\r\n\
                180.5,16.0,1.5,\"Two-line\r\nname, with \"\"quotes\"\"\"\r\n\
                181,17,2,plain\r\n";
    let (rows, problems) = csv(text.as_bytes());
    assert!(problems.is_empty(), "{problems:?}");
    assert_eq!(rows.iter().map(|r| r.line).collect::<Vec<_>>(), vec![2, 4]);
    assert_eq!(
        rows[0].name.as_deref(),
        Some("Two-line\r\nname, with \"quotes\"")
    );
    assert_eq!(
        (rows[1].diameter_m, rows[1].name.as_deref()),
        (2000.0, Some("plain"))
    );
}

#[test]
fn csv_with_byte_order_mark_reads_its_first_column() {
    // U+FEFF encoded in UTF-8 is EF BB BF (Unicode Standard, section 23.8); spreadsheets put it
    // first in "CSV UTF-8". Without stripping it the first header is not lon_deg.
    let mut bytes = vec![0xEF, 0xBB, 0xBF];
    bytes.extend_from_slice(b"lon_deg,lat_deg,diameter_m\n179.5,-16.25,900\n");
    let (rows, problems) = csv(&bytes);
    assert!(problems.is_empty(), "{problems:?}");
    assert_eq!(rows.len(), 1);
    assert_eq!((rows[0].lon_deg, rows[0].lat_deg), (179.5, -16.25));
}

#[test]
fn csv_separated_by_semicolons_or_tabs_is_recognised_by_its_header() {
    // Semicolons (where the decimal separator is a comma) and tabs (IANA
    // text/tab-separated-values) are what spreadsheets write besides commas.
    let semi = "# exported list\nName;lon_deg;lat_deg;diameter_km\n\
                \"a;b\";180.5;16;1.5\nc;180,5;16;1,5\n";
    let (rows, problems) = csv(semi.as_bytes());
    assert_eq!(rows.len(), 1, "{problems:?}");
    assert_eq!(
        (rows[0].line, rows[0].name.as_deref(), rows[0].diameter_m),
        (3, Some("a;b"), 1500.0)
    );
    // A decimal comma is a bad row, and the reason says why.
    assert_eq!(problems.len(), 1);
    assert_eq!(problems[0].line, 4);
    assert!(problems[0].reason.contains("decimal point"), "{problems:?}");

    let tab = "lon_deg\tlat_deg\tdiameter_m\tname\n-10.25\t5\t800\tx, y\n";
    let (rows, problems) = csv(tab.as_bytes());
    assert!(problems.is_empty(), "{problems:?}");
    assert_eq!(
        (rows[0].lon_deg, rows[0].diameter_m, rows[0].name.as_deref()),
        (-10.25, 800.0, Some("x, y"))
    );
}

#[test]
fn csv_quote_left_open_is_a_bad_row_in_either_mode() {
    let text = "lon_deg,lat_deg,diameter_m,name\n1,2,300,ok\n3,4,500,\"never closed\n5,6,700,x\n";
    let (rows, problems) = csv(text.as_bytes());
    assert_eq!(rows.len(), 1);
    assert_eq!(problems.len(), 1, "{problems:?}");
    assert_eq!(problems[0].line, 3);
    assert!(problems[0].reason.contains("double quote"), "{problems:?}");
    match catalogue::read_csv_bytes(text.as_bytes(), "list.csv", OnBadRow::Stop) {
        Err(craters::CraterError::CatalogueRow { line, .. }) => assert_eq!(line, 3),
        other => panic!("expected a row error, got {other:?}"),
    }
    // A quote inside a comment opens nothing.
    let (rows, problems) = csv(b"lon_deg,lat_deg,diameter_m\n\n# a 5\" note\n1,2,300\n");
    assert!(problems.is_empty(), "{problems:?}");
    assert_eq!(rows[0].line, 4);
    let e = catalogue::read_csv_bytes(b"\"lon_deg,lat_deg\n", "list.csv", OnBadRow::Skip)
        .expect_err("open quote in the header");
    assert!(e.to_string().contains("header"), "{e}");
}

#[test]
fn csv_header_no_separator_can_read_names_the_missing_column() {
    let e = catalogue::read_csv_bytes(
        b"lon_deg|lat_deg|diameter_m\n1|2|3\n",
        "l.csv",
        OnBadRow::Skip,
    )
    .expect_err("pipes are not a separator");
    let text = e.to_string();
    assert!(
        text.contains("lon_deg") && text.contains("semicolons"),
        "{text}"
    );
}
