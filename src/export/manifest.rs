//! `manifest.json`: every output file with its SHA-256 and role, so a fab or
//! a colleague can check that a bundle arrived whole. The manifest does not
//! list itself.

use super::{ExportError, OutFile};
use sha2::{Digest, Sha256};

/// Path of the manifest in the output folder.
pub const FILE_NAME: &str = "manifest.json";

/// Lower-case hexadecimal SHA-256 of `bytes`.
pub fn sha256_hex(bytes: &[u8]) -> String {
    let digest = Sha256::digest(bytes);
    let mut s = String::with_capacity(64);
    for b in digest.iter() {
        s.push_str(&format!("{b:02x}"));
    }
    s
}

/// The manifest of `files` (in their order), as pretty JSON.
pub fn manifest(name: &str, files: &[OutFile]) -> Result<Vec<u8>, ExportError> {
    let list: Vec<serde_json::Value> = files
        .iter()
        .map(|f| {
            serde_json::json!({
                "path": f.path,
                "role": f.role,
                "bytes": f.bytes.len(),
                "sha256": sha256_hex(&f.bytes),
            })
        })
        .collect();
    let v = serde_json::json!({
        "design": name,
        "generator": format!("coilwright {}", env!("CARGO_PKG_VERSION")),
        "files": list,
    });
    serde_json::to_vec_pretty(&v)
        .map_err(|e| ExportError::Unrepresentable(format!("manifest: {e}")))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sha256_of_abc() {
        // FIPS 180-2, appendix B.1 ("abc").
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
