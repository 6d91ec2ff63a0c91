//! A minimal PNG writer (ISO/IEC 15948 / W3C PNG, 8-bit RGBA, no filtering):
//! signature, IHDR, one zlib-deflated IDAT (miniz_oxide, already used by the
//! share links, so no new dependency), IEND; each chunk with its CRC-32.

/// The PNG signature (PNG section 5.2).
const SIGNATURE: [u8; 8] = [0x89, b'P', b'N', b'G', 0x0d, 0x0a, 0x1a, 0x0a];
/// RGBA, 8 bits per sample (PNG table 11.1: colour type 6).
const COLOUR_TYPE_RGBA: u8 = 6;
/// Deflate level: pictures of smooth bands pack well at the default.
const LEVEL: u8 = 6;

/// CRC-32 of PNG annex D (polynomial 0xEDB88320, reflected), bit by bit:
/// a picture's few chunks need no table.
pub fn crc32(bytes: &[u8]) -> u32 {
    let mut crc = 0xffff_ffff_u32;
    for &b in bytes {
        crc ^= b as u32;
        for _ in 0..8 {
            crc = if crc & 1 != 0 { (crc >> 1) ^ 0xedb8_8320 } else { crc >> 1 };
        }
    }
    !crc
}

fn chunk(out: &mut Vec<u8>, kind: &[u8; 4], data: &[u8]) {
    out.extend_from_slice(&(data.len() as u32).to_be_bytes());
    let start = out.len();
    out.extend_from_slice(kind);
    out.extend_from_slice(data);
    let crc = crc32(&out[start..]);
    out.extend_from_slice(&crc.to_be_bytes());
}

/// The PNG file of `width` x `height` RGBA pixels, rows from the top.
pub fn encode_rgba(width: u32, height: u32, rgba: &[u8]) -> Vec<u8> {
    let row = width as usize * 4;
    // Each scanline starts with its filter type: 0, none.
    let mut raw = Vec::with_capacity((row + 1) * height as usize);
    for line in rgba.chunks(row).take(height as usize) {
        raw.push(0);
        raw.extend_from_slice(line);
    }
    let mut ihdr = Vec::with_capacity(13);
    ihdr.extend_from_slice(&width.to_be_bytes());
    ihdr.extend_from_slice(&height.to_be_bytes());
    // bit depth 8, colour type, compression 0, filter 0, interlace 0
    ihdr.extend_from_slice(&[8, COLOUR_TYPE_RGBA, 0, 0, 0]);
    let mut out = SIGNATURE.to_vec();
    chunk(&mut out, b"IHDR", &ihdr);
    chunk(&mut out, b"IDAT", &miniz_oxide::deflate::compress_to_vec_zlib(&raw, LEVEL));
    chunk(&mut out, b"IEND", &[]);
    out
}
