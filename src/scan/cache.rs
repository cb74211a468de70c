//! Content-addressed cache of per-point yields.
//!
//! A point's yields depend on its event files, the detector profile (and
//! variation), the search definition, the seed and the code, but not on the
//! couplings or the statistics. The cache key is a SHA-256 over exactly those
//! inputs (file *contents*, not names or dates), so re-running the statistics,
//! changing couplings or moving files reuses the yields without reading a
//! single event, and any change of an input gives a new key.
//!
//! Entries are JSON files named by the key, written atomically. Numbers are
//! stored so that they read back bit for bit (every floating-point value is
//! written as its shortest round-trip decimal text and parsed with the
//! standard library), so a result computed from the cache equals one
//! computed from the events.

use std::io::Read;
use std::path::{Path, PathBuf};

use serde::Serialize;
use serde::de::DeserializeOwned;
use serde_json::Value;
use sha2::{Digest, Sha256};

use super::ScanError;
use super::atomic::{ensure_dir, write_atomic};

/// A SHA-256 digest used as a cache key or fingerprint.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct CacheKey(pub [u8; 32]);

impl CacheKey {
    /// Lower-case hexadecimal form (64 characters).
    pub fn hex(&self) -> String {
        hex(&self.0)
    }
}

/// Builds a [`CacheKey`] from named fields. Every field is framed by its
/// name and length, so different field sequences cannot collide by
/// concatenation.
#[derive(Debug, Clone)]
pub struct CacheKeyBuilder {
    hasher: Sha256,
}

impl CacheKeyBuilder {
    /// Starts a key for one purpose (the purpose is hashed first, so keys of
    /// different purposes never coincide).
    pub fn new(purpose: &str) -> Self {
        Self {
            hasher: Sha256::new(),
        }
        .text("purpose", purpose)
    }

    /// Adds a named field of raw bytes.
    pub fn bytes(mut self, name: &str, bytes: &[u8]) -> Self {
        for part in [name.as_bytes(), bytes] {
            self.hasher.update((part.len() as u64).to_le_bytes());
            self.hasher.update(part);
        }
        self
    }

    /// Adds a named text field.
    pub fn text(self, name: &str, text: &str) -> Self {
        self.bytes(name, text.as_bytes())
    }

    /// Adds a named integer.
    pub fn u64(self, name: &str, value: u64) -> Self {
        self.bytes(name, &value.to_le_bytes())
    }

    /// Adds a named floating-point number (its bits).
    pub fn f64(self, name: &str, value: f64) -> Self {
        self.bytes(name, &value.to_bits().to_le_bytes())
    }

    /// The key.
    pub fn finish(self) -> CacheKey {
        let digest = self.hasher.finalize();
        let mut out = [0u8; 32];
        out.copy_from_slice(&digest);
        CacheKey(out)
    }
}

/// SHA-256 of a file's contents, read in blocks (constant memory).
pub fn sha256_file(path: &Path) -> Result<CacheKey, ScanError> {
    let mut file = std::fs::File::open(path).map_err(|e| ScanError::io(path, e))?;
    let mut hasher = Sha256::new();
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let n = file.read(&mut buf).map_err(|e| ScanError::io(path, e))?;
        if n == 0 {
            break;
        }
        hasher.update(&buf[..n]);
    }
    let mut out = [0u8; 32];
    out.copy_from_slice(&hasher.finalize());
    Ok(CacheKey(out))
}

/// Lower-case hexadecimal form of bytes.
pub fn hex(bytes: &[u8]) -> String {
    use std::fmt::Write;
    let mut s = String::with_capacity(2 * bytes.len());
    for b in bytes {
        // invariant: writing to a String cannot fail.
        write!(s, "{b:02x}").unwrap();
    }
    s
}

/// What a cache lookup found.
#[derive(Debug)]
pub enum CacheLookup<T> {
    /// An entry for the key, read back.
    Hit(T),
    /// No entry for the key.
    Miss,
    /// An entry exists but cannot be read (for example written by another
    /// layout of the cached type); it will be recomputed and replaced.
    Unreadable(String),
}

/// A folder of cached values, one JSON file per key.
#[derive(Debug, Clone)]
pub struct YieldCache {
    dir: PathBuf,
}

impl YieldCache {
    /// A cache in `dir` (created when missing).
    pub fn open(dir: &Path) -> Result<Self, ScanError> {
        ensure_dir(dir)?;
        Ok(Self {
            dir: dir.to_path_buf(),
        })
    }

    /// The cache folder.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// The entry file of `key`.
    pub fn entry_path(&self, key: &CacheKey) -> PathBuf {
        self.dir.join(format!("{}.json", key.hex()))
    }

    /// Looks `key` up.
    pub fn get<T: DeserializeOwned>(&self, key: &CacheKey) -> CacheLookup<T> {
        let path = self.entry_path(key);
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return CacheLookup::Miss,
            Err(e) => return CacheLookup::Unreadable(format!("{}: {e}", path.display())),
        };
        match from_exact_json(&text) {
            Ok(v) => CacheLookup::Hit(v),
            Err(e) => CacheLookup::Unreadable(format!("{}: {e}", path.display())),
        }
    }

    /// Stores `value` under `key` (atomically).
    pub fn put<T: Serialize>(&self, key: &CacheKey, value: &T) -> Result<(), ScanError> {
        let path = self.entry_path(key);
        let text = to_exact_json(value).map_err(|e| ScanError::Output {
            path: path.clone(),
            message: format!("cannot encode the cache entry: {e}"),
        })?;
        write_atomic(&path, text.as_bytes())
    }
}

/// Name of the wrapper object that carries one floating-point number as
/// text in exact JSON.
const FLOAT_TAG: &str = "$f64";

/// Serialises `value` to JSON in which every floating-point number is
/// written as `{"$f64": "<shortest round-trip text>"}`, so that
/// [`from_exact_json`] reads it back bit for bit.
///
/// Non-finite numbers cannot pass through JSON's data model and are
/// refused (serde_json would turn them into `null`).
pub fn to_exact_json<T: Serialize>(value: &T) -> Result<String, String> {
    let mut v = serde_json::to_value(value).map_err(|e| e.to_string())?;
    tag_floats(&mut v);
    serde_json::to_string(&v).map_err(|e| e.to_string())
}

/// Reads JSON written by [`to_exact_json`].
pub fn from_exact_json<T: DeserializeOwned>(text: &str) -> Result<T, String> {
    let mut v: Value = serde_json::from_str(text).map_err(|e| e.to_string())?;
    untag_floats(&mut v)?;
    serde_json::from_value(v).map_err(|e| e.to_string())
}

fn tag_floats(v: &mut Value) {
    match v {
        Value::Number(n) if n.is_f64() => {
            // invariant: is_f64() was just checked.
            let x = n.as_f64().unwrap();
            let mut m = serde_json::Map::new();
            m.insert(FLOAT_TAG.into(), Value::String(format!("{x:?}")));
            *v = Value::Object(m);
        }
        Value::Array(a) => a.iter_mut().for_each(tag_floats),
        Value::Object(o) => o.values_mut().for_each(tag_floats),
        _ => {}
    }
}

fn untag_floats(v: &mut Value) -> Result<(), String> {
    match v {
        Value::Object(o) if o.len() == 1 && o.contains_key(FLOAT_TAG) => {
            let text = o[FLOAT_TAG].as_str().unwrap_or_default();
            let x: f64 = text
                .parse()
                .map_err(|_| format!("\"{text}\" is not a number"))?;
            *v = serde_json::Number::from_f64(x)
                .map(Value::Number)
                .ok_or_else(|| format!("non-finite number \"{text}\""))?;
        }
        Value::Array(a) => {
            for x in a {
                untag_floats(x)?;
            }
        }
        Value::Object(o) => {
            for x in o.values_mut() {
                untag_floats(x)?;
            }
        }
        _ => {}
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(Debug, PartialEq, serde::Serialize, serde::Deserialize)]
    struct Sample {
        name: String,
        values: Vec<f64>,
        count: u64,
    }

    #[test]
    fn sha256_of_known_input() {
        // SHA-256("abc"), FIPS 180-2 Appendix B.1 test vector (published).
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("abc");
        std::fs::write(&p, b"abc").unwrap();
        assert_eq!(
            sha256_file(&p).unwrap().hex(),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }

    #[test]
    fn framing_separates_fields() {
        let a = CacheKeyBuilder::new("t")
            .text("x", "ab")
            .text("y", "c")
            .finish();
        let b = CacheKeyBuilder::new("t")
            .text("x", "a")
            .text("y", "bc")
            .finish();
        assert_ne!(a, b);
    }

    #[test]
    fn exact_json_round_trips_every_bit() {
        // Values whose shortest decimal form stresses a naive parser.
        let values = vec![
            0.1 + 0.2,
            1.0 / 3.0,
            2.225_073_858_507_201_4e-308,
            9_007_199_254_740_993.0,
            1.7976931348623157e308,
            -0.0,
            5e-324,
            123_456.789_012_345_68,
        ];
        let s = Sample {
            name: "x".into(),
            values: values.clone(),
            count: u64::MAX,
        };
        let text = to_exact_json(&s).unwrap();
        let back: Sample = from_exact_json(&text).unwrap();
        for (a, b) in values.iter().zip(&back.values) {
            assert_eq!(a.to_bits(), b.to_bits(), "{a} vs {b}");
        }
        assert_eq!(back.count, u64::MAX);
    }

    #[test]
    fn cache_hit_miss_and_unreadable() {
        let dir = tempfile::tempdir().unwrap();
        let cache = YieldCache::open(&dir.path().join("c")).unwrap();
        let key = CacheKeyBuilder::new("t").u64("seed", 3).finish();
        assert!(matches!(cache.get::<Sample>(&key), CacheLookup::Miss));
        let s = Sample {
            name: "y".into(),
            values: vec![1.5],
            count: 2,
        };
        cache.put(&key, &s).unwrap();
        match cache.get::<Sample>(&key) {
            CacheLookup::Hit(v) => assert_eq!(v, s),
            other => panic!("expected a hit, got {other:?}"),
        }
        std::fs::write(cache.entry_path(&key), "{not json").unwrap();
        assert!(matches!(
            cache.get::<Sample>(&key),
            CacheLookup::Unreadable(_)
        ));
    }
}
