//! The package's build script (`build` in Cargo.toml). Converts the built-in fluid
//! files (src/fluids/data/*.yaml, the files people read and cite) into JSON in the
//! build's output folder, where the program reads them: the same numbers (every float written in its shortest round-trip form), parsed
//! several times faster when a fluid is first used. A unit test in
//! src/fluids/mod.rs checks that every file reads the same either way.

use std::path::Path;

fn main() {
    let data = Path::new("src/fluids/data");
    let out = std::env::var("OUT_DIR").expect("cargo sets OUT_DIR");
    println!("cargo:rerun-if-changed=src/fluids/data");
    let mut names: Vec<String> = std::fs::read_dir(data)
        .expect("src/fluids/data is readable")
        .filter_map(|entry| entry.ok())
        .map(|entry| entry.file_name().to_string_lossy().into_owned())
        .filter(|name| name.ends_with(".yaml"))
        .collect();
    names.sort();
    for name in names {
        let path = data.join(&name);
        println!("cargo:rerun-if-changed={}", path.display());
        let text = std::fs::read_to_string(&path)
            .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
        let value: serde_json::Value = serde_yaml::from_str(&text)
            .unwrap_or_else(|e| panic!("{} is not valid YAML: {e}", path.display()));
        let json = serde_json::to_string(&value)
            .unwrap_or_else(|e| panic!("{} has no JSON form: {e}", path.display()));
        let target = Path::new(&out).join(name.replace(".yaml", ".json"));
        std::fs::write(&target, json)
            .unwrap_or_else(|e| panic!("cannot write {}: {e}", target.display()));
    }
}
