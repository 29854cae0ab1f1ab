//! `cryochain table` computes rows on every core in blocks; its output must not
//! depend on the number of threads, and rows keep their order and their errors.

mod common;

#[test]
fn the_table_is_the_same_on_one_thread_and_on_three() {
    let dir = std::env::temp_dir().join(format!("cryochain-table-threads-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let mut csv = String::from("# states over several blocks\nfluid,T [K],p [bar],case\n");
    for i in 0..3000 {
        let (fluid, coldest) = [("nitrogen", 70.0), ("hydrogen", 20.0), ("helium", 5.0)][i % 3];
        let t = coldest + (i % 97) as f64 * 3.1;
        let p = 0.5 + (i % 41) as f64 * 2.5;
        // Every 500th row is refused (a temperature below absolute zero).
        let t = if i % 500 == 7 { -t } else { t };
        csv.push_str(&format!("{fluid},{t},{p},\"row {i}, as given\"\n"));
    }
    let input = dir.join("states.csv");
    std::fs::write(&input, &csv).unwrap();
    let run = |threads: &str| {
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_cryochain"))
            .args(["table", input.to_str().unwrap()])
            .env("RAYON_NUM_THREADS", threads)
            .output()
            .unwrap();
        (
            out.status.code(),
            String::from_utf8(out.stdout).unwrap(),
            String::from_utf8(out.stderr).unwrap(),
        )
    };
    let one = run("1");
    let three = run("3");
    assert_eq!(one, three);
    let (code, out, err) = one;
    assert_eq!(code, Some(1), "refused rows give exit 1: {err}");
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines.len(), 3001);
    // Row order kept; the refused rows named by their line in the file (two
    // comment/header lines before the first row).
    assert!(lines[1].starts_with("nitrogen,70,0.5,\"row 0, as given\","));
    assert!(lines[8].contains("absolute zero"), "{}", lines[8]);
    assert!(err.contains("line 10:"), "{err}");
    assert!(err.contains("6 of 3000 rows failed"), "{err}");
}
