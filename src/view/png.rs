//! A minimal PNG writer for grey images with transparency, so that the SVG writer can embed a
//! raster ([`crate::view::scene::Item::Raster`]) as one `<image>` instead of thousands of
//! rectangles.
//!
//! Format (the PNG specification, ISO/IEC 15948, and RFC 1950/1951 for the zlib stream): the
//! signature, an IHDR chunk (8-bit grey with alpha, colour type 4), one IDAT chunk holding a zlib
//! stream of *stored* (uncompressed) deflate blocks of at most 65,535 bytes, and IEND. Each row
//! starts with filter type 0. Chunks end with the CRC-32 of their type and data (polynomial
//! 0xEDB88320, reflected); the zlib stream ends with the Adler-32 of the raw data. A cell with
//! no shade is written transparent (alpha 0).

/// The PNG file of a `columns` × `rows` grey image, row 0 at the top; `None` cells transparent.
pub fn grey_png(columns: usize, rows: usize, grey: &[Option<u8>]) -> Vec<u8> {
    let mut raw = Vec::with_capacity(rows * (1 + 2 * columns));
    for row in 0..rows {
        raw.push(0);
        for c in 0..columns {
            match grey.get(row * columns + c).copied().flatten() {
                Some(g) => raw.extend_from_slice(&[g, 255]),
                None => raw.extend_from_slice(&[0, 0]),
            }
        }
    }
    let mut z = vec![0x78, 0x01];
    let mut blocks = raw.chunks(65_535).peekable();
    if blocks.peek().is_none() {
        z.extend_from_slice(&[1, 0, 0, 0xFF, 0xFF]);
    }
    while let Some(block) = blocks.next() {
        z.push(u8::from(blocks.peek().is_none()));
        let len = block.len() as u16;
        z.extend_from_slice(&len.to_le_bytes());
        z.extend_from_slice(&(!len).to_le_bytes());
        z.extend_from_slice(block);
    }
    z.extend_from_slice(&adler32(&raw).to_be_bytes());

    let mut out = vec![0x89, b'P', b'N', b'G', 0x0D, 0x0A, 0x1A, 0x0A];
    let mut header = Vec::with_capacity(13);
    header.extend_from_slice(&(columns as u32).to_be_bytes());
    header.extend_from_slice(&(rows as u32).to_be_bytes());
    header.extend_from_slice(&[8, 4, 0, 0, 0]);
    chunk(&mut out, b"IHDR", &header);
    chunk(&mut out, b"IDAT", &z);
    chunk(&mut out, b"IEND", &[]);
    out
}

/// Standard base64 (RFC 4648) with padding, for a `data:` URL.
pub fn base64(bytes: &[u8]) -> String {
    const ALPHABET: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for group in bytes.chunks(3) {
        let b = [group[0], *group.get(1).unwrap_or(&0), *group.get(2).unwrap_or(&0)];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for k in 0..4 {
            if k <= group.len() {
                out.push(char::from(ALPHABET[((n >> (18 - 6 * k)) & 63) as usize]));
            } else {
                out.push('=');
            }
        }
    }
    out
}

/// Appends one chunk: length, type, data, CRC-32 of type and data.
fn chunk(out: &mut Vec<u8>, kind: &[u8; 4], data: &[u8]) {
    out.extend_from_slice(&(data.len() as u32).to_be_bytes());
    let start = out.len();
    out.extend_from_slice(kind);
    out.extend_from_slice(data);
    let crc = crc32(&out[start..]);
    out.extend_from_slice(&crc.to_be_bytes());
}

/// CRC-32 (reflected, polynomial 0xEDB88320), bit by bit: images here are small.
fn crc32(bytes: &[u8]) -> u32 {
    let mut crc = 0xFFFF_FFFFu32;
    for &b in bytes {
        crc ^= u32::from(b);
        for _ in 0..8 {
            crc = if crc & 1 == 1 {
                (crc >> 1) ^ 0xEDB8_8320
            } else {
                crc >> 1
            };
        }
    }
    !crc
}

/// Adler-32 of `bytes`.
fn adler32(bytes: &[u8]) -> u32 {
    let (mut a, mut b) = (1u32, 0u32);
    for &x in bytes {
        a = (a + u32::from(x)) % 65_521;
        b = (b + a) % 65_521;
    }
    (b << 16) | a
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Published check values: CRC-32 of "123456789" is 0xCBF43926, Adler-32 of "Wikipedia" is
    /// 0x11E60398 (common practice; RFC 1950's reference implementation gives the same).
    #[test]
    fn checksums_match_their_check_values() {
        assert_eq!(crc32(b"123456789"), 0xCBF4_3926);
        assert_eq!(adler32(b"Wikipedia"), 0x11E6_0398);
        assert_eq!(base64(b"Man"), "TWFu");
        assert_eq!(base64(b"Ma"), "TWE=");
        assert_eq!(base64(b"M"), "TQ==");
    }

    #[test]
    fn an_image_has_its_chunks_and_sizes() {
        let png = grey_png(3, 2, &[Some(0), None, Some(255), Some(7), Some(8), None]);
        assert_eq!(&png[..8], &[0x89, b'P', b'N', b'G', 0x0D, 0x0A, 0x1A, 0x0A]);
        assert_eq!(&png[12..16], b"IHDR");
        assert_eq!(&png[16..24], &[0, 0, 0, 3, 0, 0, 0, 2]);
        assert_eq!(&png[png.len() - 8..png.len() - 4], b"IEND");
        // IDAT: zlib header, one final stored block of 2 × (1 + 3 × 2) = 14 bytes.
        let idat = &png[33..];
        assert_eq!(&idat[4..8], b"IDAT");
        assert_eq!(&idat[8..15], &[0x78, 0x01, 1, 14, 0, !14u8, 0xFF]);
        assert_eq!(&idat[15..22], &[0, 0, 255, 0, 0, 255, 255]);
    }
}
