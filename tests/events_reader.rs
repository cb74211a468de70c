//! Integration tests of the event reader: a differential test against the
//! `lhef` crate, determinism on 1 and N threads, gzip input, the weight
//! convention for every IDWTUP, and one test per strict error.

mod events_support;

use events_support::{Spec, gzip, lhef_string, write_lhef};
use recoil::events::{
    ChunkContext, Event, EventError, EventSource, FileCombination, ReadOptions, SampleSummary,
};
use std::path::{Path, PathBuf};

fn write(dir: &Path, name: &str, bytes: &[u8]) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, bytes).expect("writing a test file");
    p
}

/// Every chunk's context and events, in order.
type Chunks = Vec<(ChunkContext, Vec<Event>)>;

fn read_all(paths: &[PathBuf], opts: ReadOptions) -> Result<(Chunks, SampleSummary), EventError> {
    let src = EventSource::open(paths, opts)?;
    let mut chunks = Vec::new();
    let summary = src.for_each_chunk(|ctx, evs| (*ctx, evs.to_vec()), |c| chunks.push(c), None)?;
    Ok((chunks, summary))
}

fn events_of(paths: &[PathBuf]) -> Vec<Event> {
    let (chunks, _) = read_all(paths, ReadOptions::default()).expect("valid sample");
    chunks.into_iter().flat_map(|(_, e)| e).collect()
}

fn err_of(text: &[u8]) -> String {
    let dir = tempfile::tempdir().expect("temp dir");
    let p = write(dir.path(), "bad.lhe", text);
    match read_all(&[p], ReadOptions::default()) {
        Ok(_) => panic!("expected an error"),
        Err(e) => e.to_string(),
    }
}

/// Events read by the `lhef` crate, converted to our type; `<wgt>` values
/// read from the event's optional information with `str::parse` (the
/// correctly rounded standard parser).
fn lhef_reference(path: &Path) -> Vec<Event> {
    let f = std::io::BufReader::new(std::fs::File::open(path).expect("open"));
    let mut r = lhef::Reader::new(f).expect("lhef header");
    let mut out = Vec::new();
    while let Some(e) = r.hepeup().expect("lhef event") {
        let particles = (0..e.NUP as usize)
            .map(|i| recoil::events::Particle {
                id: e.IDUP[i],
                status: e.ISTUP[i],
                mothers: [e.MOTHUP[i][0] as u32, e.MOTHUP[i][1] as u32],
                colour: e.ICOLUP[i],
                p4: recoil::kinematics::P4::new(e.PUP[i][3], e.PUP[i][0], e.PUP[i][1], e.PUP[i][2]),
                mass_gev: e.PUP[i][4],
                lifetime_mm: e.VTIMUP[i],
                spin: e.SPINUP[i],
            })
            .collect();
        let weights = e
            .info
            .lines()
            .filter_map(|l| {
                let l = l.trim();
                let v = l.strip_prefix("<wgt")?.split_once('>')?.1;
                Some(
                    v.split_once("</wgt>")?
                        .0
                        .trim()
                        .parse::<f64>()
                        .expect("wgt"),
                )
            })
            .collect();
        out.push(Event {
            process_id: e.IDRUP,
            weight: e.XWGTUP,
            scale_gev: e.SCALUP,
            alpha_qed: e.AQEDUP,
            alpha_qcd: e.AQCDUP,
            particles,
            weights,
        });
    }
    out
}

fn bits(e: &Event) -> Vec<u64> {
    let mut v = vec![
        e.process_id as u64,
        e.weight.to_bits(),
        e.scale_gev.to_bits(),
        e.alpha_qed.to_bits(),
        e.alpha_qcd.to_bits(),
    ];
    for p in &e.particles {
        v.extend([
            p.id as u64,
            p.status as u64,
            p.mothers[0] as u64,
            p.mothers[1] as u64,
        ]);
        v.extend([p.colour[0] as u64, p.colour[1] as u64]);
        for x in [
            p.p4.px,
            p.p4.py,
            p.p4.pz,
            p.p4.e,
            p.mass_gev,
            p.lifetime_mm,
            p.spin,
        ] {
            v.push(x.to_bits());
        }
    }
    v.extend(e.weights.iter().map(|w| w.to_bits()));
    v
}

fn names(n: usize) -> Vec<String> {
    (0..n).map(|k| format!("{}", 1001 + k)).collect()
}

// Reference: the `lhef` crate 0.6.0 (an independent reader). Several
// chunks (the file is larger than the 4 MiB block), two processes,
// negative weights and nine named weights.
#[test]
fn differential_against_lhef_crate_fixed_notation() {
    let dir = tempfile::tempdir().expect("temp dir");
    let spec = Spec {
        n_events: 12_000,
        idwtup: -4,
        processes: vec![(1, 2.0, 0.1), (7, 1.0, 0.05)],
        negative_every: 7,
        weight_names: names(9),
        ..Default::default()
    };
    let text = lhef_string(&spec);
    assert!(
        text.len() > 2 * recoil::events::BLOCK_BYTES,
        "needs several chunks"
    );
    let p = write(dir.path(), "ref.lhe", text.as_bytes());
    let ours = events_of(std::slice::from_ref(&p));
    let theirs = lhef_reference(&p);
    assert_eq!(ours.len(), 12_000);
    assert_eq!(ours.len(), theirs.len());
    for (i, (a, b)) in ours.iter().zip(&theirs).enumerate() {
        assert_eq!(bits(a), bits(b), "event {}", i + 1);
    }
}

/// Our `<init>` reading against the `lhef` crate's HEPRUP of the same file.
fn assert_init_like_lhef_crate(path: &Path) {
    let ours = recoil::events::read_file_info(path).expect("our header");
    let f = std::fs::File::open(path).expect("open");
    let mut head = [0u8; 2];
    std::io::Read::read_exact(&mut std::fs::File::open(path).expect("open"), &mut head)
        .expect("magic");
    let reader: Box<dyn std::io::BufRead> = if head == [0x1f, 0x8b] {
        Box::new(std::io::BufReader::new(flate2::read::MultiGzDecoder::new(
            f,
        )))
    } else {
        Box::new(std::io::BufReader::new(f))
    };
    let theirs = lhef::Reader::new(reader)
        .expect("lhef header")
        .heprup()
        .clone();
    let at = path.display();
    assert_eq!(ours.beam_ids, theirs.IDBMUP, "{at}");
    assert_eq!(
        ours.beam_energies_gev.map(f64::to_bits),
        theirs.EBMUP.map(f64::to_bits),
        "{at}"
    );
    assert_eq!(ours.pdf_groups, theirs.PDFGUP, "{at}");
    assert_eq!(ours.pdf_sets, theirs.PDFSUP, "{at}");
    assert_eq!(ours.idwtup, theirs.IDWTUP, "{at}");
    assert_eq!(ours.processes.len(), theirs.NPRUP as usize, "{at}");
    for (k, p) in ours.processes.iter().enumerate() {
        assert_eq!(p.id, theirs.LPRUP[k], "{at}");
        assert_eq!(p.xsec_pb.to_bits(), theirs.XSECUP[k].to_bits(), "{at}");
        assert_eq!(p.xsec_err_pb.to_bits(), theirs.XERRUP[k].to_bits(), "{at}");
        assert_eq!(p.xmax.to_bits(), theirs.XMAXUP[k].to_bits(), "{at}");
    }
}

// Reference: the `lhef` crate 0.6.0's HEPRUP (an independent reader of
// `<init>`), on generated files in both notations, gzip-compressed, and on
// every committed demo file (written by the `lhef` crate's writer).
#[test]
fn init_block_like_lhef_crate() {
    let dir = tempfile::tempdir().expect("temp dir");
    let spec = Spec {
        n_events: 3,
        idwtup: -4,
        processes: vec![(1, 2.0, 0.1), (7, 1.0e-5, 3.25e-7)],
        weight_names: names(2),
        ..Default::default()
    };
    let text = lhef_string(&spec);
    assert_init_like_lhef_crate(&write(dir.path(), "a.lhe", text.as_bytes()));
    assert_init_like_lhef_crate(&write(dir.path(), "a.lhe.gz", &gzip(text.as_bytes())));
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-events");
    let mut n = 0;
    for e in std::fs::read_dir(&demo).expect("demo-events") {
        let p = e.expect("entry").path();
        if p.to_string_lossy().ends_with(".lhe.gz") {
            assert_init_like_lhef_crate(&p);
            n += 1;
        }
    }
    assert!(n >= 24, "demo files: {n}");
}

// Reference: the `lhef` crate's own writer (shortest round-trip notation,
// e.g. `84515.12`, `1e-5`) read back by the `lhef` crate.
#[test]
fn differential_against_lhef_crate_writer_notation() {
    let dir = tempfile::tempdir().expect("temp dir");
    let src = write(
        dir.path(),
        "src.lhe",
        lhef_string(&Spec {
            n_events: 500,
            ..Default::default()
        })
        .as_bytes(),
    );
    let mut reader = lhef::Reader::new(std::io::BufReader::new(
        std::fs::File::open(&src).expect("open"),
    ))
    .expect("header");
    let mut out = Vec::new();
    {
        let mut w = lhef::Writer::new(std::io::Cursor::new(&mut out), "1.0").expect("writer");
        let mut heprup = reader.heprup().clone();
        heprup.info.clear();
        w.heprup(&heprup).expect("init");
        let mut k = 0u32;
        while let Some(mut e) = reader.hepeup().expect("event") {
            k += 1;
            // Vary magnitudes so that every notation branch is hit.
            e.XWGTUP *= 1.0e-7 * f64::from(k);
            for p in &mut e.PUP {
                p[0] *= 1.0e-3 * f64::from(k % 17);
                p[2] *= 1.0e9;
            }
            e.info.clear();
            w.hepeup(&e).expect("write");
        }
        w.finish().expect("finish");
    }
    let p = write(dir.path(), "written.lhe", &out);
    let ours = events_of(std::slice::from_ref(&p));
    let theirs = lhef_reference(&p);
    assert_eq!(ours.len(), 500);
    for (i, (a, b)) in ours.iter().zip(&theirs).enumerate() {
        assert_eq!(bits(a), bits(b), "event {}", i + 1);
    }
}

// Reference: the same events in the usual `<wgt id='…'> v </wgt>` layout
// (read by the `lhef` crate above). LHEF 3.0 (arXiv:1405.1067, Sec. 23, from memory)
// fixes the tag, not the spacing, the quote character, the order of the
// `<wgt>` lines or extra attributes; every such layout must give the same
// weights, bit for bit, as the usual one.
#[test]
fn weight_lines_in_other_layouts_read_like_the_usual_one() {
    let dir = tempfile::tempdir().expect("temp dir");
    let t = lhef_string(&Spec {
        n_events: 40,
        weight_names: names(3),
        ..Default::default()
    });
    let usual = write(dir.path(), "usual.lhe", t.as_bytes());
    let want = lhef_reference(&usual);
    assert_eq!(events_of(std::slice::from_ref(&usual)), want);
    let mut k = 0usize;
    let mut edited = String::new();
    let mut block: Vec<String> = Vec::new();
    for line in t.lines() {
        if line.starts_with("<wgt ") {
            // `<wgt id='1001'> -1.1250000000e+00 </wgt>` → id and value text.
            let (id, rest) = line["<wgt id='".len()..]
                .split_once("'>")
                .expect("usual layout");
            let v = rest.trim().trim_end_matches("</wgt>").trim();
            let short = v.parse::<f64>().expect("number").to_string();
            block.push(match k % 5 {
                0 => format!("<wgt id=\"{id}\">{short}</wgt>"),
                1 => format!("   <wgt id='{id}'>\t{v}</wgt>\r"),
                2 => format!("<wgt  id = '{id}' info='scale'> {v} </wgt>"),
                3 => format!("<wgt id='{id}'>{short}</wgt>   "),
                _ => line.to_string(),
            });
            k += 1;
            continue;
        }
        if !block.is_empty() {
            // Reverse the order of the lines in every third event.
            if k.is_multiple_of(3) {
                block.reverse();
            }
            for b in block.drain(..) {
                edited.push_str(&b);
                edited.push('\n');
            }
        }
        edited.push_str(line);
        edited.push('\n');
    }
    let other = write(dir.path(), "other.lhe", edited.as_bytes());
    let got = events_of(std::slice::from_ref(&other));
    assert_eq!(got.len(), want.len());
    for (i, (a, b)) in got.iter().zip(&want).enumerate() {
        assert_eq!(bits(a), bits(b), "event {}", i + 1);
    }
    // A repeated name is an error in either layout.
    let n = line_of(&t, 20, "<wgt id='1002'>");
    let dup = edit_line(&t, n, |l| l.replace("1002", "1001"));
    let e = err_of(dup.as_bytes());
    assert!(
        e.contains(&format!("line {n}: weight id '1001' appears twice")),
        "{e}"
    );
    let dup = edit_line(&t, n, |_| {
        "<wgt id='1002'> 1.5 </wgt>\n<wgt id='1002'> 1.5 </wgt>".into()
    });
    let e = err_of(dup.as_bytes());
    assert!(
        e.contains(&format!("line {}: weight id '1002' appears twice", n + 1)),
        "{e}"
    );
    // Out of order, then a repeat that is in the expected place.
    let first = line_of(&t, 20, "<wgt id='1001'>");
    let mut dup = edit_line(&t, first, |_| "<wgt id='1003'> 1.5 </wgt>".into());
    dup = edit_line(&dup, first + 2, |_| "<wgt id='1003'> 2.5 </wgt>".into());
    let e = err_of(dup.as_bytes());
    assert!(
        e.contains(&format!(
            "line {}: weight id '1003' appears twice",
            first + 2
        )),
        "{e}"
    );
}

// A `<rwgt>` block in the usual form is read at once by the layout of an
// earlier block; any other block line by line. Each byte of the second
// event's block, after its `<rwgt>` line, is set to each of a set of
// bytes, and the file must read exactly as the same file does with that
// `<rwgt>` line written `<rwgt> ` (a form the whole-block reader does not
// take, which sends the block to the line reader): the same events bit
// for bit, or the same error.
#[test]
fn weight_blocks_read_like_their_lines() {
    let t = lhef_string(&Spec {
        n_events: 3,
        weight_names: names(3),
        ..Default::default()
    });
    let first = t.find("<rwgt>\n").expect("a block") + 1;
    let start = t[first..].find("<rwgt>\n").expect("a second block") + first;
    let end = t[start..].find("</rwgt>\n").expect("its end") + start + "</rwgt>\n".len();
    let dir = tempfile::tempdir().expect("temp dir");
    let p = dir.path().join("w.lhe");
    let read = |text: &[u8]| -> Result<Vec<Vec<u64>>, String> {
        std::fs::write(&p, text).expect("write");
        read_all(std::slice::from_ref(&p), ReadOptions::default())
            .map(|(chunks, _)| {
                chunks
                    .iter()
                    .flat_map(|(_, e)| e.iter().map(bits))
                    .collect()
            })
            .map_err(|e| e.to_string())
    };
    let line_by_line = |text: &[u8]| -> Vec<u8> {
        let mut v = text[..start].to_vec();
        v.extend_from_slice(b"<rwgt> ");
        v.extend_from_slice(&text[start + "<rwgt>".len()..]);
        v
    };
    let mut n_ok = 0;
    for at in start + "<rwgt>\n".len()..end {
        for b in *b"09+-.eEx \t\n<>/'\"" {
            let mut m = t.clone().into_bytes();
            m[at] = b;
            let got = read(&m);
            let want = read(&line_by_line(&m));
            assert_eq!(got, want, "byte {} set to {:?}", at - start, b as char);
            n_ok += usize::from(got.is_ok());
        }
    }
    // Both outcomes occur: many edits keep a valid file (a digit for a
    // digit), many break it.
    assert!(n_ok > 100, "{n_ok} valid edits");
}

// Determinism (CONVENTIONS.md): the same summary and chunking on 1 and 2
// threads, bit for bit.
#[test]
fn identical_on_one_and_many_threads() {
    let dir = tempfile::tempdir().expect("temp dir");
    let spec = Spec {
        n_events: 9_000,
        idwtup: -1,
        weight: 0.123_456_789,
        negative_every: 3,
        ..Default::default()
    };
    let p = write(dir.path(), "a.lhe", lhef_string(&spec).as_bytes());
    // One pass: its summary and, per chunk, (first event, events, bits of
    // a weighted sum).
    let pass = || {
        let src =
            EventSource::open(std::slice::from_ref(&p), ReadOptions::default()).expect("open");
        let mut partial = Vec::new();
        let s = src
            .for_each_chunk(
                |ctx, evs| {
                    let sum: f64 = evs.iter().map(|e| e.weight * e.particles[2].p4.pt()).sum();
                    (ctx.first_event_index, evs.len(), sum.to_bits())
                },
                |x| partial.push(x),
                None,
            )
            .expect("read");
        (s, partial)
    };
    let run = |threads: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .expect("pool");
        pool.install(pass)
    };
    let (s1, p1) = run(1);
    let (s2, p2) = run(2);
    assert!(p1.len() > 1);
    assert_eq!(p1, p2);
    assert_eq!(s1, s2);
    assert_eq!(s1.sum_w.to_bits(), s2.sum_w.to_bits());
    // Chunks are contiguous and cover every event once.
    let mut next = 0u64;
    for (first, n, _) in &p1 {
        assert_eq!(*first, next);
        next += *n as u64;
    }
    assert_eq!(next, 9_000);
    // Passes nested in parallel work (as the scan runs several points at
    // once): more passes than workers, each called on a pool worker, must
    // all finish with the same chunks (no deadlock, no mixing).
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .expect("pool");
    let nested: Vec<_> = pool.install(|| {
        use rayon::prelude::*;
        (0..5).into_par_iter().map(|_| pass().1).collect()
    });
    for partial in nested {
        assert_eq!(partial, p1);
    }
}

// gzip detected by magic bytes (RFC 1952), whatever the name, including a
// multi-member file made of two gzip streams one after the other. Plain
// files are read through memory maps and gzip files by copying: both cut
// the same chunks (first event index and events per chunk) over several
// blocks.
#[test]
fn gzip_and_multi_member_gzip_read_like_plain() {
    let dir = tempfile::tempdir().expect("temp dir");
    let text = lhef_string(&Spec {
        n_events: 9_000,
        weight_names: names(3),
        ..Default::default()
    });
    assert!(text.len() > 2 * recoil::events::BLOCK_BYTES);
    let plain = write(dir.path(), "p.lhe", text.as_bytes());
    let gz = write(dir.path(), "no-suffix.lhe", &gzip(text.as_bytes()));
    let (a, b) = text.as_bytes().split_at(text.len() / 3);
    let mut multi = gzip(a);
    multi.extend(gzip(b));
    let mm = write(dir.path(), "multi.lhe.gz", &multi);
    assert_same_chunks(&plain, &[gz, mm]);
    let src = EventSource::open(&[dir.path().join("no-suffix.lhe")], ReadOptions::default())
        .expect("open");
    assert!(src.info().files[0].gzip);
    assert_eq!(src.info().weight_names, names(3));
}

/// Asserts that every file of `others` gives the chunks (context, number of
/// events, bits of every event) of `reference`.
fn assert_same_chunks(reference: &Path, others: &[PathBuf]) {
    let chunks = |p: &Path| -> Vec<(ChunkContext, Vec<Vec<u64>>)> {
        let (chunks, _) = read_all(&[p.to_path_buf()], ReadOptions::default()).expect("valid");
        chunks
            .into_iter()
            .map(|(ctx, evs)| (ctx, evs.iter().map(bits).collect()))
            .collect()
    };
    let want = chunks(reference);
    assert!(want.len() > 1, "{} chunks", want.len());
    for p in others {
        assert_eq!(chunks(p), want, "{}", p.display());
    }
}

// An event longer than a block (optional information of 1.5 MiB): the
// block grows until an event tag follows, for plain and gzip files alike.
#[test]
fn event_longer_than_a_block_reads_like_gzip() {
    let t = lhef_string(&Spec {
        n_events: 6_000,
        ..Default::default()
    });
    // Before the end tag of the first event, which starts the first block.
    let end = line_of(&t, 0, "</event>");
    let filler = "# filler line of the optional information\n".repeat(40_000);
    assert!(filler.len() > recoil::events::BLOCK_BYTES * 3 / 2);
    let mut lines: Vec<String> = t.lines().map(|l| format!("{l}\n")).collect();
    lines.insert(end - 1, filler);
    let t: String = lines.concat();
    let dir = tempfile::tempdir().expect("temp dir");
    let plain = write(dir.path(), "long.lhe", t.as_bytes());
    let gz = write(dir.path(), "long.lhe.gz", &gzip(t.as_bytes()));
    assert_same_chunks(&plain, &[gz]);
    assert_eq!(events_of(&[plain]).len(), 6_000);
}

// Header information: beams, √s = 2√(E₁E₂) = 13600 GeV for 6800 GeV beams
// (LHC Run 3, common practice), PDF ids, IDWTUP, processes.
#[test]
fn header_information() {
    let dir = tempfile::tempdir().expect("temp dir");
    let p = write(
        dir.path(),
        "h.lhe",
        lhef_string(&Spec {
            idwtup: 2,
            processes: vec![(3, 4.5, 0.25), (9, 0.5, 0.125)],
            ..Default::default()
        })
        .as_bytes(),
    );
    let src = EventSource::open(&[p], ReadOptions::default()).expect("open");
    let f = &src.info().files[0];
    assert_eq!(f.version, "3.0");
    assert_eq!(f.beam_ids, [2212, 2212]);
    assert_eq!(f.beam_energies_gev, [6800.0, 6800.0]);
    assert_eq!(f.sqrt_s_gev, 13600.0);
    assert_eq!(f.pdf_sets, [303600, 303600]);
    assert_eq!(f.idwtup, 2);
    assert_eq!(f.processes.len(), 2);
    assert_eq!(
        (
            f.processes[1].id,
            f.processes[1].xsec_pb,
            f.processes[1].xsec_err_pb
        ),
        (9, 0.5, 0.125)
    );
}

fn summary_of(specs: &[Spec], comb: FileCombination) -> SampleSummary {
    let dir = tempfile::tempdir().expect("temp dir");
    let paths: Vec<PathBuf> = specs
        .iter()
        .enumerate()
        .map(|(i, s)| write(dir.path(), &format!("f{i}.lhe"), lhef_string(s).as_bytes()))
        .collect();
    read_all(
        &paths,
        ReadOptions {
            combination: comb,
            ..Default::default()
        },
    )
    .expect("valid sample")
    .1
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-12 * b.abs().max(1.0)
}

/// (IDWTUP, processes, weight, events, negative_every, factors, σ [pb]).
type Case = (i32, Vec<(i32, f64, f64)>, f64, usize, usize, Vec<f64>, f64);

// weight_to_pb for every IDWTUP, against values worked out by hand from the
// convention documented in README (Les Houches accord, hep-ph/0109068).
#[test]
fn weight_to_pb_every_idwtup_hand_computed() {
    let one = FileCombination::IndependentRuns;
    // (idwtup, processes, weight, n_events, negative_every,
    //  expected factors per process, expected σ [pb]) — by hand:
    let cases: Vec<Case> = vec![
        // ±1, ±4: f = 1/N; σ = Σw/N.
        (1, vec![(1, 9.9, 0.1)], 0.5, 4, 0, vec![0.25], 0.5),
        // 4 events ±2, event 0 negative: Σw = 4, σ = 1.
        (-1, vec![(1, 9.9, 0.1)], 2.0, 4, 4, vec![0.25], 1.0),
        (4, vec![(1, 9.9, 0.1)], 0.5, 4, 0, vec![0.25], 0.5),
        (-4, vec![(1, 9.9, 0.1)], 2.0, 4, 4, vec![0.25], 1.0),
        // ±2: f_p = XSECUP_p / Σ_p w. Processes alternate; 2 events each of
        // weight 0.5: f_1 = 3/1, f_2 = 1/1; σ = 4.
        (
            2,
            vec![(1, 3.0, 0.3), (2, 1.0, 0.4)],
            0.5,
            4,
            0,
            vec![3.0, 1.0],
            4.0,
        ),
        // 6 events, 0 and 5 negative: Σ_1 = 0.5(−1+1+1) = 0.5 → f_1 = 6;
        // Σ_2 = 0.5(1+1−1) = 0.5 → f_2 = 2.
        (
            -2,
            vec![(1, 3.0, 0.3), (2, 1.0, 0.4)],
            0.5,
            6,
            5,
            vec![6.0, 2.0],
            4.0,
        ),
        // ±3: f = Σ XSECUP / Σw = 3/(4·0.5) = 1.5; σ = 3.
        (3, vec![(1, 3.0, 0.3)], 0.5, 4, 0, vec![1.5], 3.0),
        // 3 events, event 0 negative: Σw = 0.5 → f = 6.
        (-3, vec![(1, 3.0, 0.3)], 0.5, 3, 3, vec![6.0], 3.0),
        // Two processes under +3 share one factor: Σ XSECUP = 4, Σw = 2.
        (
            3,
            vec![(1, 3.0, 0.3), (2, 1.0, 0.4)],
            0.5,
            4,
            0,
            vec![2.0, 2.0],
            4.0,
        ),
    ];
    for (idwtup, procs, weight, n, neg, factors, xsec) in cases {
        let spec = Spec {
            idwtup,
            processes: procs.clone(),
            weight,
            n_events: n,
            negative_every: neg,
            ..Default::default()
        };
        let s = summary_of(&[spec], one);
        for ((pid, _, _), f) in procs.iter().zip(&factors) {
            assert!(
                close(s.weight_to_pb(0, *pid), *f),
                "IDWTUP {idwtup} process {pid}: {} vs {f}",
                s.weight_to_pb(0, *pid)
            );
        }
        assert!(
            close(s.cross_section_pb().0, xsec),
            "IDWTUP {idwtup}: σ {:?}",
            s.cross_section_pb()
        );
        assert_eq!(s.weight_to_pb(0, 12345), 0.0);
        assert_eq!(s.weight_to_pb(1, procs[0].0), 0.0);
    }
}

// Several files. A: 4 events, w = 0.5, XSECUP = 3 → f_A = 1.5, σ_A = 3;
// B: 2 events, w = 1, XSECUP = 6 → f_B = 3, σ_B = 6 (IDWTUP 3, by hand).
// Independent runs: c = N_k/N → f' = 1.0 and 1.0, σ = (4·3 + 2·6)/6 = 4.
// Separate processes: f' = 1.5 and 3, σ = 9.
#[test]
fn file_combinations_hand_computed() {
    let a = Spec {
        idwtup: 3,
        processes: vec![(1, 3.0, 0.3)],
        weight: 0.5,
        n_events: 4,
        ..Default::default()
    };
    let b = Spec {
        idwtup: 3,
        processes: vec![(1, 6.0, 0.4)],
        weight: 1.0,
        n_events: 2,
        ..Default::default()
    };
    let s = summary_of(&[a.clone(), b.clone()], FileCombination::IndependentRuns);
    assert!(close(s.weight_to_pb(0, 1), 1.0));
    assert!(close(s.weight_to_pb(1, 1), 1.0));
    assert!(close(s.xsec_pb, 4.0));
    // δσ = √((4/6·0.3)² + (2/6·0.4)²) = 0.23333 (by hand).
    assert!((s.xsec_err_pb - ((0.2f64).powi(2) + (0.4f64 / 3.0).powi(2)).sqrt()).abs() < 1e-12);
    assert!(s.weight_convention.contains("independent runs"));
    let s = summary_of(&[a, b], FileCombination::SeparateProcesses);
    assert!(close(s.weight_to_pb(0, 1), 1.5));
    assert!(close(s.weight_to_pb(1, 1), 3.0));
    assert!(close(s.xsec_pb, 9.0));
    assert!(s.weight_convention.contains("separate processes"));
}

// Σ f·w over the sample equals the cross-section (the defining property of
// the factor), and the negative-weight fraction counts: 1 in 4 (by hand).
#[test]
fn weights_sum_to_cross_section() {
    let spec = Spec {
        idwtup: -3,
        processes: vec![(1, 2.5, 0.1), (2, 1.5, 0.1)],
        weight: 1.0,
        n_events: 400,
        negative_every: 4,
        ..Default::default()
    };
    let dir = tempfile::tempdir().expect("temp dir");
    let p = write(dir.path(), "w.lhe", lhef_string(&spec).as_bytes());
    let (chunks, s) = read_all(&[p], ReadOptions::default()).expect("read");
    let s = &s;
    let total: f64 = chunks
        .iter()
        .flat_map(|(c, evs)| {
            evs.iter()
                .map(move |e| s.weight_to_pb(c.file_index, e.process_id) * e.weight)
        })
        .sum();
    assert!(close(total, 4.0), "{total}");
    assert!(close(s.negative_weight_fraction, 0.25));
}

// ---------------------------------------------------------------- errors

fn base_text() -> String {
    lhef_string(&Spec {
        n_events: 5,
        ..Default::default()
    })
}

/// 1-based line number of the first line containing `needle` after line
/// `after` (1-based).
fn line_of(text: &str, after: usize, needle: &str) -> usize {
    text.lines()
        .enumerate()
        .skip(after)
        .find(|(_, l)| l.contains(needle))
        .map(|(i, _)| i + 1)
        .expect("needle present")
}

/// Replaces the 1-based line `n` by `f(line)`.
fn edit_line(text: &str, n: usize, f: impl Fn(&str) -> String) -> String {
    let mut out: Vec<String> = text.lines().map(str::to_string).collect();
    out[n - 1] = f(&out[n - 1]);
    out.join("\n") + "\n"
}

/// 1-based line of the k-th (1-based) particle line of event `ev`.
fn particle_line(text: &str, ev: usize, k: usize) -> usize {
    let start = text
        .lines()
        .enumerate()
        .filter(|(_, l)| l.trim() == "<event>")
        .nth(ev - 1)
        .map(|(i, _)| i + 1)
        .expect("event present");
    start + 1 + k
}

#[test]
fn error_wrong_first_line() {
    let t = base_text().replacen("<LesHouchesEvents", "<LesHouches", 1);
    let e = err_of(t.as_bytes());
    assert!(
        e.contains("bad.lhe: line 1: first line must be <LesHouchesEvents"),
        "{e}"
    );
}

#[test]
fn error_missing_first_line() {
    let t: String = base_text()
        .lines()
        .skip(1)
        .map(|l| format!("{l}\n"))
        .collect();
    let e = err_of(t.as_bytes());
    assert!(e.contains("line 1: first line must be"), "{e}");
}

#[test]
fn error_unsupported_version() {
    let t = base_text().replacen("version=\"3.0\"", "version=\"4.0\"", 1);
    let e = err_of(t.as_bytes());
    assert!(e.contains("line 1: unsupported LHEF version '4.0'"), "{e}");
}

#[test]
fn error_missing_init() {
    let t = base_text();
    let start = t.find("<init>").expect("init");
    let end = t.find("</init>\n").expect("init end") + 8;
    let t = format!("{}{}", &t[..start], &t[end..]);
    let e = err_of(t.as_bytes());
    assert!(e.contains("missing <init> block"), "{e}");
    assert!(e.contains("line 5"), "{e}");
}

#[test]
fn error_truncated_inside_event() {
    let t = base_text();
    let cut = particle_line(&t, 3, 4);
    let t: String = t.lines().take(cut).map(|l| format!("{l}\n")).collect();
    let e = err_of(t.as_bytes());
    assert!(e.contains("event 3:"), "{e}");
    assert!(e.contains("truncated in the middle of the event"), "{e}");
}

#[test]
fn error_truncated_without_end_tag() {
    let t = lhef_string(&Spec {
        n_events: 5,
        end_tag: false,
        ..Default::default()
    });
    let e = err_of(t.as_bytes());
    assert!(
        e.contains("ends after event 5 without </LesHouchesEvents>"),
        "{e}"
    );
}

#[test]
fn error_wrong_number_of_columns() {
    let t = base_text();
    let n = particle_line(&t, 2, 3);
    let t = edit_line(&t, n, |l| {
        l.rsplit_once(' ').expect("columns").0.to_string()
    });
    let e = err_of(t.as_bytes());
    assert!(
        e.contains(&format!(
            "event 2: line {n}: particle line 3 has 12 columns, expected 13"
        )),
        "{e}"
    );
}

#[test]
fn error_wrong_number_of_event_columns() {
    let t = base_text();
    let n = line_of(&t, 0, "<event>") + 1;
    let t = edit_line(&t, n, |l| format!("{l} 1.0"));
    let e = err_of(t.as_bytes());
    assert!(
        e.contains(&format!(
            "event 1: line {n}: event line has 7 columns, expected 6"
        )),
        "{e}"
    );
}

#[test]
fn error_non_numeric_field() {
    let t = base_text();
    let n = particle_line(&t, 4, 2);
    let t = edit_line(&t, n, |l| {
        let mut f: Vec<&str> = l.split_whitespace().collect();
        f[8] = "1.0x";
        f.join(" ")
    });
    let e = err_of(t.as_bytes());
    assert!(
        e.contains(&format!(
            "event 4: line {n}: particle 2: pz must be a number, got '1.0x'"
        )),
        "{e}"
    );
    let t = edit_line(&base_text(), n, |l| {
        let mut f: Vec<&str> = l.split_whitespace().collect();
        f[0] = "2x";
        f.join(" ")
    });
    let e = err_of(t.as_bytes());
    assert!(e.contains("IDUP must be an integer"), "{e}");
}

#[test]
fn error_nan_or_infinite_momentum() {
    for bad in ["nan", "NaN", "inf", "-infinity", "1e400"] {
        let t = base_text();
        let n = particle_line(&t, 1, 3);
        let t = edit_line(&t, n, |l| {
            let mut f: Vec<&str> = l.split_whitespace().collect();
            f[6] = bad;
            f.join(" ")
        });
        let e = err_of(t.as_bytes());
        assert!(
            e.contains(&format!("event 1: line {n}: particle 3: px must be finite")),
            "{bad}: {e}"
        );
        assert!(e.contains("GeV"), "{e}");
    }
}

#[test]
fn error_nup_disagrees_with_particle_lines() {
    let t = base_text();
    let n = line_of(&t, 0, "<event>") + 1;
    let more = edit_line(&t, n, |l| l.replacen(" 6 ", " 7 ", 1));
    let e = err_of(more.as_bytes());
    assert!(
        e.contains("event 1:") && e.contains("NUP = 7 but the event has only 6 particle lines"),
        "{e}"
    );
    let fewer = edit_line(&t, n, |l| l.replacen(" 6 ", " 5 ", 1));
    let e = err_of(fewer.as_bytes());
    assert!(
        e.contains("event 1:") && e.contains("NUP = 5 but the event has more particle lines"),
        "{e}"
    );
}

#[test]
fn error_empty_file() {
    let e = err_of(b"");
    assert!(e.contains("bad.lhe: line 1: empty file"), "{e}");
}

#[test]
fn error_undeclared_process_id() {
    let t = base_text();
    let n = line_of(&t, 0, "<event>") + 1;
    let t = edit_line(&t, n, |l| l.replacen(" 6 1 ", " 6 4 ", 1));
    let e = err_of(t.as_bytes());
    assert!(
        e.contains("IDPRUP 4 is not among the LPRUP of <init> (1)"),
        "{e}"
    );
}

#[test]
fn error_corrupt_and_truncated_gzip() {
    let text = lhef_string(&Spec {
        n_events: 2_000,
        ..Default::default()
    });
    let gz = gzip(text.as_bytes());
    // Truncated stream.
    let e = err_of(&gz[..gz.len() / 2]);
    assert!(
        e.contains("bad.lhe") && (e.contains("gzip") || e.contains("truncated")),
        "{e}"
    );
    // Corrupted bytes in the middle of the deflate data.
    let mut bad = gz.clone();
    for b in &mut bad[gz.len() / 2..gz.len() / 2 + 64] {
        *b ^= 0x5a;
    }
    let e = err_of(&bad);
    assert!(e.contains("bad.lhe"), "{e}");
    // Corrupted CRC trailer.
    let mut bad = gz;
    let k = bad.len() - 6;
    bad[k] ^= 0xff;
    let e = err_of(&bad);
    assert!(e.contains("corrupt gzip stream"), "{e}");
}

#[test]
fn error_weight_names_disagree() {
    let t = lhef_string(&Spec {
        n_events: 3,
        weight_names: names(2),
        ..Default::default()
    });
    let n = line_of(&t, 20, "<wgt id='1002'>");
    let t2 = edit_line(&t, n, |l| l.replace("1002", "2002"));
    let e = err_of(t2.as_bytes());
    assert!(
        e.contains(&format!(
            "line {n}: <wgt id='2002'> is not declared in <initrwgt>"
        )),
        "{e}"
    );
    let t3 = edit_line(&t, n, |_| String::new());
    let e = err_of(t3.as_bytes());
    assert!(e.contains("event lacks weight '1002'"), "{e}");
}

#[test]
fn error_text_after_end_tag() {
    let t = base_text() + "<event>\n";
    let e = err_of(t.as_bytes());
    assert!(e.contains("after </LesHouchesEvents>"), "{e}");
}

// Robustness: every truncation of a valid file is an error (except at the
// very end), and corrupted bytes never make the reader panic.
#[test]
fn truncations_and_corruptions_never_panic() {
    let t = lhef_string(&Spec {
        n_events: 4,
        weight_names: names(2),
        ..Default::default()
    });
    let bytes = t.as_bytes();
    let end = t.find("</LesHouchesEvents>").expect("end tag");
    let dir = tempfile::tempdir().expect("temp dir");
    let p = dir.path().join("cut.lhe");
    for cut in (0..end).step_by(7) {
        std::fs::write(&p, &bytes[..cut]).expect("write");
        let r = read_all(std::slice::from_ref(&p), ReadOptions::default());
        assert!(r.is_err(), "truncation at byte {cut} accepted");
    }
    let mut x: u64 = 99;
    for _ in 0..400 {
        // Knuth MMIX LCG (common practice) picks the byte and its value.
        x = x
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        let mut b = bytes.to_vec();
        let at = (x >> 33) as usize % b.len();
        b[at] = (x >> 20) as u8;
        std::fs::write(&p, &b).expect("write");
        let _ = read_all(std::slice::from_ref(&p), ReadOptions::default());
        let gz = gzip(&b);
        let mut g = gz.clone();
        let at = (x >> 40) as usize % g.len();
        g[at] ^= 0x41;
        std::fs::write(&p, &g).expect("write");
        let _ = read_all(std::slice::from_ref(&p), ReadOptions::default());
    }
}

// Writing with std::io to a file in pieces (used by the benchmarks) gives
// the same text as writing to memory.
#[test]
fn generator_is_deterministic() {
    let spec = Spec::default();
    let mut v = Vec::new();
    write_lhef(&spec, &mut v).expect("write");
    assert_eq!(v, lhef_string(&spec).into_bytes());
}

// Chunks are cut before every line that opens an event tag, so a comment
// between events must not hold one: in the middle of a chunk and where
// the chunk is cut before it (the tag inside the comment is the last one
// of the first block), the error names the tag's line and the comment's.
#[test]
fn error_event_tag_inside_a_comment() {
    let t = base_text();
    let second = line_of(&t, line_of(&t, 0, "<event>"), "<event>");
    let mut lines: Vec<String> = t.lines().map(|l| format!("{l}\n")).collect();
    lines.insert(second - 1, "<!-- a note\n  <event>\n-->\n".into());
    assert_event_tag_in_comment(&lines.concat(), second + 1, second);

    let t = lhef_string(&Spec {
        n_events: 9_000,
        ..Default::default()
    });
    let body = t.find("</init>\n").expect("init end") + "</init>\n".len();
    let block_end = body + recoil::events::BLOCK_BYTES;
    // The last event that starts well before the block's end.
    let at = t[..block_end - 4_000].rfind("<event>\n").expect("an event");
    let pad = block_end - 100 - at - "<!--\n".len();
    let comment = format!(
        "<!--\n{}\n<event>\n{}-->\n",
        "x".repeat(pad - 1),
        "y\n".repeat(500)
    );
    let t = format!("{}{comment}{}", &t[..at], &t[at..]);
    let opened = t[..at].lines().count() + 1;
    assert_event_tag_in_comment(&t, opened + 2, opened);
}

/// Asserts that `text` fails with an event tag on line `tag_line` inside
/// the comment opened on line `opened`.
fn assert_event_tag_in_comment(text: &str, tag_line: usize, opened: usize) {
    let e = err_of(text.as_bytes());
    assert!(
        e.contains(&format!(
            "line {tag_line}: an <event> tag inside the comment opened on line {opened}"
        )),
        "{e}"
    );
}

// Event and line numbers stay right in a later chunk of a large file (the
// line is found by searching the text, independently of the reader).
#[test]
fn error_numbers_in_a_later_chunk() {
    let t = lhef_string(&Spec {
        n_events: 9_000,
        ..Default::default()
    });
    assert!(t.len() > 2 * recoil::events::BLOCK_BYTES);
    // Event k starts on line 9 + 9(k−1) of this layout; find it by text.
    let target = 8_765;
    let n = particle_line(&t, target, 5);
    let t = edit_line(&t, n, |l| l.replacen("52", "52 7", 1));
    let e = err_of(t.as_bytes());
    assert!(
        e.contains(&format!(
            "event {target}: line {n}: particle line 5 has 14 columns"
        )),
        "{e}"
    );
}

// An error in the first chunk while many chunks are still to be read: the
// pass stops with that error (the reader, waiting for room in the window
// of chunks in flight, is told to stop), on one worker and on all.
#[test]
fn early_error_stops_a_long_pass() {
    let t = lhef_string(&Spec {
        n_events: 30_000,
        ..Default::default()
    });
    assert!(
        t.len() > 6 * recoil::events::BLOCK_BYTES,
        "more chunks than the window"
    );
    let n = particle_line(&t, 3, 2);
    let t = edit_line(&t, n, |l| format!("{l} 7"));
    let dir = tempfile::tempdir().expect("temp dir");
    let p = write(dir.path(), "bad.lhe", t.as_bytes());
    for threads in [1, 2] {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .expect("pool");
        let e = match pool.install(|| read_all(std::slice::from_ref(&p), ReadOptions::default())) {
            Ok(_) => panic!("expected an error"),
            Err(e) => e.to_string(),
        };
        assert!(
            e.contains(&format!(
                "event 3: line {n}: particle line 2 has 14 columns"
            )),
            "{e}"
        );
    }
}
