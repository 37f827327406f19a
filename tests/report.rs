//! The round report on a generated history of a sample room: its content from
//! the JSON form, the HTML and SVG checked with general-purpose parsers, the
//! Markdown snapshotted, the page opened in headless Chromium, and the
//! command run as a user would.

use std::path::{Path, PathBuf};
use std::process::Command;

use chrono::{DateTime, Duration, FixedOffset, TimeZone};
use serde_json::Value;
use ulid::Ulid;

use tankwalk::model::Facility;
use tankwalk::model::record::{Correction, DeviceId, Reading, Record, RecordBody, Target};
use tankwalk::report::{self, Format, Request, Selection};
use tankwalk::store::{Entry, MemStore, SledStore, Store};

const ROOM: &str = "sample-rooms/harbourside-holding.toml";

fn room() -> Facility {
    Facility::load(&Path::new(env!("CARGO_MANIFEST_DIR")).join(ROOM)).unwrap()
}

fn offset() -> FixedOffset {
    FixedOffset::east_opt(3600).unwrap()
}

/// This morning, after the round: 1 December 2026, 09:30 local.
fn now() -> DateTime<FixedOffset> {
    offset().with_ymd_and_hms(2026, 12, 1, 9, 30, 0).unwrap()
}

fn device() -> DeviceId {
    DeviceId(Ulid::from_parts(1, 7))
}

fn record(n: u64, at: DateTime<FixedOffset>, operator: &str, body: RecordBody) -> Record {
    let millis = u64::try_from(at.timestamp_millis()).unwrap();
    Record {
        id: Ulid::from_parts(millis, u128::from(n)),
        device: device(),
        operator: operator.into(),
        taken_at: at,
        body,
    }
}

/// Thirty days of generated rounds (up to yesterday), then this morning's
/// round begun and not finished (`demo::round_in_progress`): racks A–C read as
/// systems (rack B's ammonia up overnight), rack D skipped for a move, Q-1
/// read, Q-2 skipped, Q-3 and Q-4 not reached, then a water change on rack B;
/// and a reading after the report time that must not show.
fn history(facility: &Facility) -> Vec<Record> {
    let mut records = tankwalk::demo::history(facility, device(), now(), 30, 2026);
    records.extend(tankwalk::demo::round_in_progress(facility, device(), &records, now(), 2026));
    let mut later = Reading::new(Target::Tank("Q-3".into()));
    later.observations.deaths = 40;
    records.push(record(1, now() + Duration::hours(3), "Ines Okafor", RecordBody::Reading(later)));
    records
}

/// Records as history entries without corrections.
fn entries(records: Vec<Record>) -> Vec<Entry> {
    records.into_iter().map(|original| Entry { original, corrections: Vec::new() }).collect()
}

fn report_of(selection: Selection) -> (Facility, report::RoundReport) {
    let facility = room();
    let records = history(&facility);
    let request = Request::round_ending(&facility, now(), selection);
    let report = report::gather(&facility, &entries(records), &request).unwrap();
    (facility, report)
}

fn json(report: &report::RoundReport) -> Value {
    serde_json::from_str(&Format::Json.render(report)).unwrap()
}

/// The folder for files a person looks at after the tests: beside the target's tmp folder.
fn output_dir() -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).parent().unwrap().join("report-screenshots");
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// Un-ionized fraction from Emerson et al. (1975), J. Fish. Res. Board Can. 32:2379–2383:
/// pKa = 0.09018 + 2729.92 / T, T in kelvin; an independent check of the NH3 figures.
fn emerson_nh3_n(tan_n: f64, ph: f64, temp_c: f64) -> f64 {
    let pka = 0.09018 + 2729.92 / (temp_c + 273.15);
    tan_n / (10f64.powf(pka - ph) + 1.0)
}

fn close(a: f64, b: f64, relative: f64) -> bool {
    (a - b).abs() <= relative * b.abs().max(1e-12)
}

fn find<'a>(items: &'a Value, key: &str, value: &str) -> &'a Value {
    items.as_array().unwrap().iter().find(|i| i[key] == value).unwrap_or_else(|| panic!("no {key} = {value}"))
}

#[test]
fn json_form_has_the_round_the_tanks_to_act_on_the_trends_and_the_deaths() {
    let (_, report) = report_of(Selection::Room);
    let j = json(&report);

    // The round: 52 tanks; racks A–C read as systems, rack D and Q-2 skipped, Q-3 and Q-4 not reached.
    let c = &j["counts"];
    assert_eq!((c["tanks"].as_u64(), c["done"].as_u64()), (Some(52), Some(37)));
    assert_eq!((c["skipped"].as_u64(), c["not_reached"].as_u64()), (Some(13), Some(2)));
    assert_eq!(c["act"], 12, "the twelve tanks of rack A, whose filter an antibiotic hurt");
    assert_eq!(c["critical"], 0);
    let walkers: Vec<(&str, u64, u64)> = j["round"]["walked_by"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| (w["operator"].as_str().unwrap(), w["readings"].as_u64().unwrap(), w["skips"].as_u64().unwrap()))
        .collect();
    assert_eq!(walkers, [("Ines Okafor", 3, 0), ("Anneke Sollis", 1, 2)], "events and later records are not the round");
    assert_eq!(j["round"]["started"], "2026-12-01T07:25:00+01:00");
    let tanks = &j["round"]["tanks"];
    let d07 = find(tanks, "tank", "D-07");
    assert_eq!((d07["status"].as_str(), d07["via_system"].as_bool()), (Some("skipped"), Some(true)));
    assert_eq!(d07["reason"], "being moved to the new stand");
    assert_eq!(find(tanks, "tank", "Q-2")["reason"], "emptied for cleaning");
    assert_eq!(find(tanks, "tank", "Q-3")["status"], "not-reached");
    assert_eq!(find(tanks, "tank", "Q-4")["status"], "not-reached");
    let a05 = find(tanks, "tank", "A-05");
    assert_eq!(
        (a05["status"].as_str(), a05["band"].as_str(), a05["by"].as_str()),
        (Some("done"), Some("act"), Some("Ines Okafor"))
    );
    let order: Vec<&str> = tanks.as_array().unwrap().iter().map(|t| t["tank"].as_str().unwrap()).collect();
    assert_eq!(&order[..2], ["A-01", "A-02"]);
    assert_eq!(&order[48..], ["Q-1", "Q-2", "Q-3", "Q-4"], "round order of the facility file");

    // Rack A first: in act, with a water change sized for the whole shared volume.
    let attention = j["attention"].as_array().unwrap();
    let rack_a = &attention[0];
    assert_eq!(rack_a["target"]["system"], "RACK-A");
    assert_eq!(rack_a["reasons"], serde_json::json!(["act"]));
    assert_eq!(rack_a["tanks"].as_array().unwrap().len(), 12);
    let r = &rack_a["reading"];
    let (tan, ph, temp) = (r["tan_n_mg_l"].as_f64().unwrap(), r["ph"].as_f64().unwrap(), r["temp_c"].as_f64().unwrap());
    let nh3 = r["nh3_n_mg_l"].as_f64().unwrap();
    assert!(close(nh3, emerson_nh3_n(tan, ph, temp), 1e-3), "{nh3} vs Emerson 1975");
    assert!((0.05..0.2).contains(&nh3), "act band, default edges 0.05–0.2 mg/L NH3-N: {nh3}");
    let kinds: Vec<&str> = rack_a["actions"].as_array().unwrap().iter().map(|a| a["kind"].as_str().unwrap()).collect();
    for kind in ["water-change", "hold-feeding", "check-biofilter", "retest"] {
        assert!(kinds.contains(&kind), "{kind} in {kinds:?}");
    }
    let change = find(&rack_a["actions"], "kind", "water-change");
    let (percent, litres) = (change["quantity"].as_f64().unwrap(), change["also"]["quantity"].as_f64().unwrap());
    assert_eq!(change["unit"], "%");
    // Litres are the percent of the system's whole 1780 L (facility file), to the litre.
    assert!((litres - percent / 100.0 * 1780.0).abs() <= 1.0, "{percent} % of 1780 L is not {litres} L");
    assert!(rack_a["biofilter"]["state"] == "at-risk", "{}", rack_a["biofilter"]);

    // Hidden risks: rack B (pH 6.9) and the acid quarantine tank Q-1, with what was done since.
    let latent: Vec<&str> = attention
        .iter()
        .filter(|c| c["reasons"].as_array().unwrap().contains(&Value::from("latent")))
        .map(|c| c["target"].as_object().unwrap().values().next().unwrap().as_str().unwrap())
        .collect();
    assert_eq!(latent, ["RACK-B", "Q-1"]);
    let rack_b = attention.iter().find(|c| c["target"]["system"] == "RACK-B").unwrap();
    let since = rack_b["events_since"].as_array().unwrap();
    assert_eq!(since.len(), 1);
    assert_eq!((since[0]["kind"].as_str(), since[0]["by"].as_str()), (Some("water-change"), Some("Tomasz Whitlow")));
    let warning_kinds: Vec<&str> =
        rack_b["warnings"].as_array().unwrap().iter().map(|w| w["kind"].as_str().unwrap()).collect();
    assert!(warning_kinds.contains(&"do-not-raise-ph"), "{warning_kinds:?}");
    let q1 = attention.iter().find(|c| c["target"]["tank"] == "Q-1").unwrap();
    assert!(q1["latent"]["band"] != q1["band"]);
    assert_eq!(j["counts"]["latent_risks"], 13);

    // Waters: the four racks, then the standalone tanks of concern (Q-1) or with sick fish (Q-4).
    let waters: Vec<String> = j["waters"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["target"].as_object().unwrap().values().next().unwrap().to_string())
        .collect();
    assert_eq!(waters, ["\"RACK-A\"", "\"RACK-B\"", "\"RACK-C\"", "\"RACK-D\"", "\"Q-1\"", "\"Q-4\""]);
    assert_eq!(j["not_charted"], serde_json::json!(["Q-2", "Q-3"]));
    let water_a = &j["waters"][0];
    let nh3_series = find(&water_a["series"], "measure", "nh3");
    let points = nh3_series["points"].as_array().unwrap();
    assert_eq!(points.len(), 14, "one reading a day over the 14-day period");
    assert_eq!(points.last().unwrap()["band"], "act");
    assert_eq!(water_a["band_edges"], serde_json::json!({"watch": 0.02, "act": 0.05, "critical": 0.2}));
    let events = water_a["events"].as_array().unwrap();
    let numbers: Vec<u64> = events.iter().map(|e| e["number"].as_u64().unwrap()).collect();
    assert_eq!(numbers, (1..=events.len() as u64).collect::<Vec<_>>());
    assert!(events.iter().any(|e| e["kind"] == "medication"), "the antibiotic is on the chart");
    // Neon tetras on rack B bring their lower edges to the whole system's chart.
    assert_eq!(j["waters"][1]["band_edges"]["watch"], 0.015);

    // Deaths and signs over the period: Q-4's sick fish; the 40 deaths recorded after the report time are not.
    let sightings = j["sightings"].as_array().unwrap();
    assert_eq!(sightings.len(), 2);
    assert!(sightings.iter().all(|s| s["target"]["tank"] == "Q-4"));
    assert_eq!(j["counts"]["deaths"], 1);
    assert_eq!(j["caution"], tankwalk::CAUTION);
}

#[test]
fn a_past_day_one_system_and_one_tank() {
    let facility = room();
    let records = entries(history(&facility));
    let day = |d: u32, h: u32, m: u32, s: u32| offset().with_ymd_and_hms(2026, 11, d, h, m, s).unwrap();
    let request = Request::day(&facility, day(30, 15, 0, 0), Selection::Room);
    assert_eq!(
        (request.round.since, request.round.until),
        (day(30, 0, 0, 0), day(30, 23, 59, 59) + Duration::milliseconds(999))
    );
    let past = json(&report::gather(&facility, &records, &request).unwrap());
    assert_eq!(past["counts"]["done"], 52, "the generated rounds are complete");
    assert_eq!(past["counts"]["skipped"], 0);
    assert!(past["sightings"].as_array().unwrap().iter().all(|s| s["at"].as_str().unwrap() < "2026-12"));

    let rack_d = json(
        &report::gather(
            &facility,
            &records,
            &Request::round_ending(&facility, now(), Selection::System("rack-d".into())),
        )
        .unwrap(),
    );
    assert_eq!(rack_d["selection"], serde_json::json!({"kind": "system", "id": "RACK-D"}));
    assert_eq!(rack_d["counts"]["tanks"], 12);
    assert_eq!(rack_d["counts"]["skipped"], 12);
    assert_eq!(rack_d["waters"].as_array().unwrap().len(), 1);

    let q4 = json(
        &report::gather(&facility, &records, &Request::round_ending(&facility, now(), Selection::Tank("q-4".into())))
            .unwrap(),
    );
    assert_eq!(q4["counts"]["tanks"], 1);
    assert_eq!(q4["waters"][0]["target"]["tank"], "Q-4");
    assert_eq!(q4["sightings"].as_array().unwrap().len(), 2);

    let unknown =
        report::gather(&facility, &records, &Request::round_ending(&facility, now(), Selection::Tank("Q-9".into())));
    let message = unknown.unwrap_err().to_string();
    assert!(message.contains("no tank 'Q-9'") && message.contains("closest"), "{message}");
}
fn xml(html: &str) -> roxmltree::Document<'_> {
    let options = roxmltree::ParsingOptions { allow_dtd: true, ..roxmltree::ParsingOptions::default() };
    roxmltree::Document::parse_with_options(html, options).expect("the page is well-formed XML")
}

/// Checks, on the parsed page, that it refers to nothing outside itself: no
/// script, no element that loads anything, no attribute holding a URL other
/// than a link within the page, no URL in its style.
fn assert_self_contained(html: &str) {
    let doc = xml(html);
    for node in doc.descendants().filter(|n| n.is_element()) {
        let tag = node.tag_name().name().to_ascii_lowercase();
        let loading = [
            "script", "link", "iframe", "object", "embed", "img", "image", "use", "audio", "video", "source", "base",
            "form",
        ];
        assert!(!loading.contains(&tag.as_str()), "a <{tag}> element");
        for attr in node.attributes() {
            let name = attr.name().to_ascii_lowercase();
            let value = attr.value().to_ascii_lowercase();
            assert!(
                !["src", "srcset", "action", "data", "poster", "background"].contains(&name.as_str()),
                "{name}= on <{tag}>"
            );
            if name == "href" {
                assert!(value.starts_with('#'), "a link out of the page: {value}");
            }
            assert!(!name.starts_with("on"), "an event handler {name}");
            assert!(!value.contains("url(") && !value.contains("javascript:"), "{name}={value}");
        }
        if tag == "style" {
            let css = node.text().unwrap_or("").to_ascii_lowercase();
            assert!(!css.contains("url(") && !css.contains("@import"), "the style loads something");
        }
    }
}

#[test]
fn html_is_well_formed_self_contained_and_its_charts_are_svg_with_titles() {
    let (_, report) = report_of(Selection::Room);
    let html = Format::Html.render(&report);
    assert_self_contained(&html);
    for text in ["http://", "https://", "<script", "src="] {
        assert!(!html.contains(text), "{text}");
    }

    // An HTML5 parser (html5ever) finds no parse error.
    let page = scraper::Html::parse_document(&html);
    assert!(page.errors.is_empty(), "HTML parse errors: {:?}", page.errors);
    let select = |css: &str| scraper::Selector::parse(css).unwrap();
    for element in page.select(&select("[href]")) {
        let href = element.value().attr("href").unwrap();
        assert!(href.starts_with('#'), "a link out of the page: {href}");
    }
    let text: String = page.root_element().text().collect();
    assert!(text.contains(tankwalk::CAUTION), "the caution is on the page");
    assert!(text.contains("Round report: Harbourside Tropicals holding room"));
    assert!(text.contains("being moved to the new stand"));
    assert_eq!(page.select(&select("article.concern")).count(), report.attention.len());
    assert_eq!(page.select(&select("li.chip")).count(), 52);

    // The same file is well-formed XML; every chart is an SVG with a title and a description.
    let doc = xml(&html);
    let charts: Vec<_> = doc.descendants().filter(|n| n.has_tag_name("svg")).collect();
    assert_eq!(charts.len(), 5 * report.waters.len());
    for svg in &charts {
        assert_eq!(svg.attribute("role"), Some("img"));
        let labelled: Vec<&str> = svg.attribute("aria-labelledby").unwrap().split(' ').collect();
        for id in labelled {
            let target = doc.descendants().find(|n| n.attribute("id") == Some(id)).expect("label exists");
            assert!(!target.text().unwrap_or("").trim().is_empty());
        }
    }
    let ids: Vec<&str> = doc.descendants().filter_map(|n| n.attribute("id")).collect();
    let mut unique = ids.clone();
    unique.sort_unstable();
    unique.dedup();
    assert_eq!(unique.len(), ids.len(), "element ids are unique");

    // Rack A's NH3 chart draws its act and watch edges, labelled, and one dot a reading.
    let nh3 = charts
        .iter()
        .find(|svg| {
            svg.children().any(|n| n.has_tag_name("title") && n.text() == Some("Toxic ammonia (NH3), mg/L NH3-N"))
        })
        .unwrap();
    let labels: Vec<&str> = nh3.descendants().filter_map(|n| n.text()).collect();
    assert!(labels.contains(&"act 0.05") && labels.contains(&"watch 0.02"), "{labels:?}");
    let dots = nh3.descendants().filter(|n| n.has_tag_name("circle") && n.attribute("r") == Some("2.6")).count();
    assert_eq!(dots, 14);
    let flags = nh3.descendants().filter(|n| n.has_tag_name("g")).count();
    assert_eq!(flags, report.waters[0].events.len(), "one event marker an event");

    // A chart as a stand-alone SVG file is a valid SVG document of its own.
    let mut chart = report::html::chart_of(&report, 0, &report.waters[0], &report.waters[0].series[0]);
    chart.standalone = true;
    let svg = report::svg::line_chart(&chart);
    let alone = roxmltree::Document::parse(&svg).unwrap();
    assert_eq!(alone.root_element().tag_name().namespace(), Some("http://www.w3.org/2000/svg"));
}

#[test]
fn text_people_typed_is_escaped_everywhere() {
    let facility = room();
    let mut records = history(&facility);
    let mut sick = Reading::new(Target::Tank("Q-1".into()));
    sick.observations.gasping = true;
    sick.note = Some("<script>alert(1)</script> & [link](http://x.example) | *bold*".into());
    records.push(record(99, now() - Duration::minutes(5), "O'Brien <ops>", RecordBody::Reading(sick)));
    let request = Request::round_ending(&facility, now(), Selection::Room);
    let report = report::gather(&facility, &entries(records), &request).unwrap();
    let html = Format::Html.render(&report);
    assert_self_contained(&html);
    assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt; &amp; [link](http:"), "escaped, not dropped");
    assert!(scraper::Html::parse_document(&html).errors.is_empty());
    let markdown = Format::Markdown.render(&report);
    assert!(markdown.contains(r"\<script\>alert(1)\</script\> & \[link\](http://x.example) \| \*bold\*"), "{markdown}");
}

#[test]
fn markdown_snapshot() {
    let (_, report) = report_of(Selection::Room);
    insta::assert_snapshot!("harbourside_round", Format::Markdown.render(&report));
}

#[test]
fn every_format_carries_the_caution() {
    let (_, report) = report_of(Selection::Tank("Q-4".into()));
    for format in Format::ALL {
        let out = format.render(&report);
        let flat = out.replace("\\", "");
        assert!(flat.contains("Guidance only, not veterinary advice"), "{format}");
        assert!(flat.contains("call an aquatic veterinarian"), "{format}");
    }
}

#[test]
fn corrections_are_reported_at_their_current_value_and_withdrawn_records_not_at_all() {
    let facility = room();
    let records = history(&facility);
    let today = |target: &str| {
        records
            .iter()
            .rev()
            .filter(|r| r.body.as_reading().is_some())
            .find(|r| {
                r.taken_at.date_naive() == now().date_naive() && r.body.target().is_some_and(|t| t.id() == target)
            })
            .unwrap()
            .clone()
    };
    let (q1, rack_b) = (today("Q-1"), today("RACK-B"));
    let mut fixed = rack_b.body.as_reading().unwrap().clone();
    fixed.measurements.ph = Some(8.4);
    let corrections = [
        record(
            2,
            now() - Duration::minutes(10),
            "Tomasz Whitlow",
            RecordBody::Correction(Correction {
                supersedes: q1.id,
                replacement: None,
                reason: "entered on the wrong tank".into(),
            }),
        ),
        record(
            3,
            now() - Duration::minutes(9),
            "Tomasz Whitlow",
            RecordBody::Correction(Correction {
                supersedes: rack_b.id,
                replacement: Some(Box::new(RecordBody::Reading(fixed))),
                reason: "pH misread".into(),
            }),
        ),
    ];
    let mut store = MemStore::with_device(device());
    store.append(&records).unwrap();
    store.append(&corrections).unwrap();
    let report =
        report::from_store(&store, &facility, &Request::round_ending(&facility, now(), Selection::Room)).unwrap();
    let j = json(&report);
    assert_eq!(find(&j["round"]["tanks"], "tank", "Q-1")["status"], "not-reached", "its only reading was withdrawn");
    let rack_b = j["attention"].as_array().unwrap().iter().find(|c| c["target"]["system"] == "RACK-B").unwrap();
    assert_eq!(rack_b["reading"]["ph"], 8.4, "the corrected pH is the one judged");
    assert_eq!(rack_b["reading"]["by"], "Ines Okafor", "still taken by the person who read it");
}

#[test]
fn a_room_with_no_records_gives_a_whole_report_of_nothing_done() {
    for room in ["harbourside-holding", "cattail-bend-tubs", "saltmarsh-marine"] {
        let facility =
            Facility::load(&Path::new(env!("CARGO_MANIFEST_DIR")).join(format!("sample-rooms/{room}.toml"))).unwrap();
        let report = report::gather(&facility, &[], &Request::round_ending(&facility, now(), Selection::Room)).unwrap();
        assert_eq!(report.counts.not_reached, facility.tanks.len(), "{room}");
        assert!(report.attention.is_empty() && report.sightings.is_empty());
        assert!(report.waters.iter().all(|w| w.latest.is_none() && w.series.iter().all(|s| s.points.is_empty())));
        let html = Format::Html.render(&report);
        assert_self_contained(&html);
        assert!(scraper::Html::parse_document(&html).errors.is_empty(), "{room}");
        for format in Format::ALL {
            assert!(!format.render(&report).is_empty());
        }
        assert!(Format::Text.render(&report).contains("No tank was checked in this round"), "{room}");
    }
}

/// Headless Chromium, when it is installed (Debian's `chromium`).
fn chromium() -> Option<PathBuf> {
    ["chromium", "chromium-browser", "google-chrome"].iter().find_map(|name| {
        let found = Command::new("sh").arg("-c").arg(format!("command -v {name}")).output().ok()?;
        let path = String::from_utf8(found.stdout).ok()?.trim().to_string();
        (found.status.success() && !path.is_empty()).then(|| PathBuf::from(path))
    })
}

/// Runs Chromium headless on `page` with `extra` arguments; returns stdout and
/// the console messages it logged (each a line of stderr).
fn run_chromium(chromium: &Path, page: &Path, extra: &[String]) -> (String, Vec<String>) {
    let profile = tempfile::tempdir().unwrap();
    let child = Command::new(chromium)
        .args(["--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars", "--no-first-run"])
        .args(["--enable-logging=stderr", "--v=0"])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .args(extra)
        .arg(format!("file://{}", page.display()))
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Output is read while it runs (a page's DOM fills a pipe), with a deadline.
    let pid = child.id();
    let (done, result) = std::sync::mpsc::channel();
    std::thread::spawn(move || {
        let _ = done.send(child.wait_with_output());
    });
    let out = match result.recv_timeout(std::time::Duration::from_secs(90)) {
        Ok(out) => out.unwrap(),
        Err(_) => {
            let _ = Command::new("kill").arg(pid.to_string()).status();
            panic!("chromium did not finish within 90 s on {}", page.display());
        }
    };
    let stderr = String::from_utf8_lossy(&out.stderr);
    // The page's own messages: console output (errors, CSP violations) and failed loads.
    let console: Vec<String> = stderr
        .lines()
        .filter(|l| l.contains(":CONSOLE") || l.contains("net::ERR_") || l.contains("Uncaught"))
        .map(str::to_string)
        .collect();
    (String::from_utf8_lossy(&out.stdout).into_owned(), console)
}

#[test]
fn chromium_opens_the_page_without_errors_and_screenshots_it() {
    let Some(chromium) = chromium() else {
        eprintln!(
            "SKIPPED chromium_opens_the_page_without_errors_and_screenshots_it: no chromium on this machine \
             (.ci/run installs Debian's chromium package; it could not be installed here)"
        );
        return;
    };
    let dir = output_dir();
    let (_, report) = report_of(Selection::Room);
    let page = dir.join("round-report.html");
    std::fs::write(&page, Format::Html.render(&report)).unwrap();

    // A page that does break the rules is caught, so the check below can fail.
    let bad = dir.join("control-with-errors.html");
    std::fs::write(
        &bad,
        "<!DOCTYPE html><html><head><meta charset=\"utf-8\" /><meta http-equiv=\"Content-Security-Policy\" \
         content=\"default-src 'none'\" /><title>control</title></head><body><p>x</p>\
         <img src=\"http://example.invalid/x.png\" alt=\"\" /></body></html>",
    )
    .unwrap();
    let (_, control) = run_chromium(&chromium, &bad, &["--dump-dom".into()]);
    assert!(!control.is_empty(), "the control page's blocked load was not reported: the check is blind");

    let (dom, errors) = run_chromium(&chromium, &page, &["--dump-dom".into()]);
    assert!(errors.is_empty(), "the page reported errors:\n{}", errors.join("\n"));
    assert!(dom.contains("Round report: Harbourside Tropicals holding room"), "the page did not load");
    assert!(dom.contains("<svg"), "the charts are in the page");

    for (name, size) in [("round-report-desktop.png", "1280,2400"), ("round-report-phone.png", "390,2400")] {
        let shot = dir.join(name);
        let _ = std::fs::remove_file(&shot);
        let (_, errors) = run_chromium(
            &chromium,
            &page,
            &[format!("--screenshot={}", shot.display()), format!("--window-size={size}")],
        );
        assert!(errors.is_empty(), "{name}: {}", errors.join("\n"));
        let png = std::fs::read(&shot).unwrap_or_else(|e| panic!("no screenshot {}: {e}", shot.display()));
        assert!(png.starts_with(b"\x89PNG\r\n\x1a\n") && png.len() > 20_000, "{name} is not a picture of the page");
    }
    let pdf = dir.join("round-report.pdf");
    let _ = std::fs::remove_file(&pdf);
    let (_, errors) =
        run_chromium(&chromium, &page, &[format!("--print-to-pdf={}", pdf.display()), "--no-pdf-header-footer".into()]);
    assert!(errors.is_empty(), "printing: {}", errors.join("\n"));
    assert!(std::fs::read(&pdf).unwrap().starts_with(b"%PDF"), "printed to PDF");
    eprintln!("screenshots and the printed PDF are in {}", dir.display());
}

/// A data folder holding the generated history.
fn stored_history() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    let mut store = SledStore::open(dir.path()).unwrap();
    store.append(&history(&room())).unwrap();
    drop(store);
    dir
}

fn tankwalk(data: &Path, args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .arg("--room")
        .arg(Path::new(env!("CARGO_MANIFEST_DIR")).join(ROOM))
        .arg("--data-dir")
        .arg(data)
        .args(args)
        .env("TZ", "Europe/Berlin")
        .env_remove("TANKWALK_ROOM")
        .env_remove("TANKWALK_DATA")
        .output()
        .unwrap()
}

#[test]
fn the_command_writes_each_format_and_refuses_bad_input() {
    let data = stored_history();
    let out_dir = tempfile::tempdir().unwrap();
    let html = out_dir.path().join("round.html");
    let run = tankwalk(data.path(), &["report", "--date", "2026-11-30", "--out", html.to_str().unwrap()]);
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    let said = String::from_utf8_lossy(&run.stdout);
    assert!(said.contains("report written to") && said.contains("html"), "{said}");
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.starts_with("<!DOCTYPE html>"));
    assert_self_contained(&page);
    let leftovers: Vec<_> = std::fs::read_dir(out_dir.path()).unwrap().map(|e| e.unwrap().file_name()).collect();
    assert_eq!(leftovers.len(), 1, "no temporary file is left: {leftovers:?}");

    let run = tankwalk(
        data.path(),
        &["report", "--since", "2026-11-01", "--until", "2026-11-30", "--system", "RACK-A", "--format", "json"],
    );
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    let j: Value = serde_json::from_slice(&run.stdout).unwrap();
    assert_eq!(j["selection"]["id"], "RACK-A");
    assert_eq!(j["counts"]["tanks"], 12);
    assert_eq!(j["counts"]["done"], 12);
    assert_eq!(j["period"]["since"], "2026-11-01T00:00:00+01:00");
    let events = j["waters"][0]["events"].as_array().unwrap();
    assert!(events.iter().any(|e| e["kind"] == "medication"));

    let run = tankwalk(data.path(), &["report", "--tank", "Q-4", "--date", "2026-11-30"]);
    assert!(run.status.success());
    let text = String::from_utf8_lossy(&run.stdout);
    assert!(text.starts_with("TANK Q-4: REPORT"), "{text}");
    assert!(text.contains("gasping, excess mucus, 1 dead"), "{text}");

    let markdown = tankwalk(data.path(), &["report", "--date", "2026-11-30", "--format", "markdown"]);
    assert!(String::from_utf8_lossy(&markdown.stdout).starts_with("# Round report: Harbourside"));

    for (args, expected) in [
        (vec!["report", "--tank", "Q-9"], "--tank: no tank 'Q-9' in this room (closest: Q-"),
        (vec!["report", "--system", "RAK-B"], "--system: no system 'RAK-B' in this room (closest: RACK-B)"),
        (vec!["report", "--date", "12h"], "--date: '12h' is not a day"),
        (vec!["report", "--since", "2026-12-01", "--until", "2026-11-01"], "--since is after --until"),
        (vec!["report", "--format", "pdf"], "'pdf' is not a report format"),
        (vec!["report", "--date", "2026-11-30", "--since", "2026-11-01"], "cannot be used with"),
    ] {
        let run = tankwalk(data.path(), &args);
        let stderr = String::from_utf8_lossy(&run.stderr);
        assert_eq!(run.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(expected), "{args:?}: {stderr}");
    }
    let folder = tankwalk(data.path(), &["report", "--out", out_dir.path().to_str().unwrap()]);
    assert_eq!(folder.status.code(), Some(2));
}
