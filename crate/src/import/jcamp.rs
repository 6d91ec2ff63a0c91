//! JCAMP-DX (IUPAC) spectra: being written; see `parse`.
