//! Catalogue seeds from GeoJSON and other OGR formats, checked against geometry computed by hand.

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
