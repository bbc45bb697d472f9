//! Read errors and the per-dataset checksums shared by every HDF5 writer
//! and reader of the sweep file (`hdf5` and `shortest`).

use std::path::Path;

use super::IoError;

/// An HDF5 error on `object` of the file at `path`.
pub fn h5err(path: &Path, object: &str, e: impl std::fmt::Display) -> IoError {
    IoError::Hdf5 {
        path: path.display().to_string(),
        object: object.to_string(),
        reason: e.to_string(),
    }
}

/// A read error on `object`: [`IoError::Damaged`] when a checksum does not
/// match, else [`IoError::Hdf5`].
pub fn read_error(path: &Path, object: &str, e: hdf5_pure::Error) -> IoError {
    use hdf5_pure::FormatError as F;
    match e {
        hdf5_pure::Error::Format(
            f @ (F::Fletcher32Mismatch { .. } | F::ChecksumMismatch { .. }),
        ) => IoError::Damaged {
            path: path.display().to_string(),
            object: object.to_string(),
            reason: f.to_string(),
        },
        e => h5err(path, object, e),
    }
}

/// HDF5 filter id of the fletcher32 checksum (the HDF5 specification's
/// filter pipeline message; h5py and libhdf5 verify it on every read).
pub const FLETCHER32: u16 = 3;

/// Chunked storage with HDF5's fletcher32 filter: each chunk carries a
/// checksum of its stored bytes that every reader (hdf5-pure, h5py, libhdf5)
/// verifies on read, so a flipped bit in a number is an error, not a value.
/// Every dataset of a sweep file is written this way.
pub fn checksummed<'a>(
    ds: &'a mut hdf5_pure::DatasetBuilder,
    chunks: &[u64],
) -> &'a mut hdf5_pure::DatasetBuilder {
    ds.with_chunks(chunks).with_fletcher32()
}
