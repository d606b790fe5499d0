//! Colorimetry: the colour a transmission spectrum shows in white light, by the CIE 1931
//! standard colorimetric observer under CIE standard illuminant D65, and its sRGB value.
//!
//! Physics. A filter of spectral transmittance T(λ) lit by an illuminant of relative spectral
//! power S(λ) is seen with the tristimulus values
//!
//! ```text
//! X = Σ S(λ) T(λ) x̄(λ) / Σ S(λ) ȳ(λ),   Y = Σ S T ȳ / Σ S ȳ,   Z = Σ S T z̄ / Σ S ȳ,
//! ```
//!
//! summed at 5 nm steps from 380 to 780 nm (the CIE's own 5 nm tables; the sum is the CIE's
//! recommended practice for data at that step). The normalisation makes a perfect transmitter
//! (T = 1) Y = 1, so Y is the luminous transmittance and (X, Y, Z) of T = 1 is the illuminant's
//! white point. The chromaticity is x = X/(X + Y + Z), y = Y/(X + Y + Z), undefined for black.
//! The sRGB value (IEC 61966-2-1:1999) is the linear transform of (X, Y, Z) by the standard's
//! matrix, each component encoded by its piecewise gamma (12.92·v up to 0.0031308, else
//! 1.055·v^(1/2.4) − 0.055) and rounded to 8 bits; components outside 0-1 are clipped, and a
//! colour that needed more than half a step of clipping is reported as outside the sRGB gamut.
//! The brightness is kept: a filter that passes a tenth of the light looks dark, as it does
//! beside the unfiltered lamp.
//!
//! Conventions. The tables' wavelengths are in standard air, as the CIE gives its tables (from
//! memory); the caller traces each point at the vacuum wavelength of that air wavelength.
//!
//! Sources. Colour-matching functions x̄, ȳ, z̄ of the CIE 1931 standard colorimetric observer and
//! the relative spectral power of CIE standard illuminant D65, both from CIE 015:2018
//! "Colorimetry", 4th edition, tables at 5 nm (transcribed through the colour-science 0.4.7
//! package's copy of the CIE tables, which tests/reference/colour_reference.py also uses to check
//! the sums); sRGB matrix and encoding from IEC 61966-2-1:1999. Checks in the unit tests below and
//! in tests/white_light.rs.

/// First wavelength of the tables, nm (in standard air).
pub const FIRST_NM: f64 = 380.0;
/// Step of the tables, nm.
pub const STEP_NM: f64 = 5.0;
/// Number of wavelengths in the tables (380 to 780 nm at 5 nm).
pub const POINTS: usize = 81;

/// Per wavelength from 380 nm at 5 nm steps: x̄, ȳ, z̄ of the CIE 1931 2° observer and the
/// relative power of illuminant D65 (CIE 015:2018).
const TABLE: [[f64; 4]; POINTS] = [
    [0.001368, 3.9e-05, 0.006450001, 49.9755],    // 380 nm
    [0.002236, 6.4e-05, 0.01054999, 52.3118],     // 385 nm
    [0.004243, 0.00012, 0.02005001, 54.6482],     // 390 nm
    [0.00765, 0.000217, 0.03621, 68.7015],        // 395 nm
    [0.01431, 0.000396, 0.06785001, 82.7549],     // 400 nm
    [0.02319, 0.00064, 0.1102, 87.1204],          // 405 nm
    [0.04351, 0.00121, 0.2074, 91.486],           // 410 nm
    [0.07763, 0.00218, 0.3713, 92.4589],          // 415 nm
    [0.13438, 0.004, 0.6456, 93.4318],            // 420 nm
    [0.21477, 0.0073, 1.0390501, 90.057],         // 425 nm
    [0.2839, 0.0116, 1.3856, 86.6823],            // 430 nm
    [0.3285, 0.01684, 1.62296, 95.7736],          // 435 nm
    [0.34828, 0.023, 1.74706, 104.865],           // 440 nm
    [0.34806, 0.0298, 1.7826, 110.936],           // 445 nm
    [0.3362, 0.038, 1.77211, 117.008],            // 450 nm
    [0.3187, 0.048, 1.7441, 117.41],              // 455 nm
    [0.2908, 0.06, 1.6692, 117.812],              // 460 nm
    [0.2511, 0.0739, 1.5281, 116.336],            // 465 nm
    [0.19536, 0.09098, 1.28764, 114.861],         // 470 nm
    [0.1421, 0.1126, 1.0419, 115.392],            // 475 nm
    [0.09564, 0.13902, 0.8129501, 115.923],       // 480 nm
    [0.05795001, 0.1693, 0.6162, 112.367],        // 485 nm
    [0.03201, 0.20802, 0.46518, 108.811],         // 490 nm
    [0.0147, 0.2586, 0.3533, 109.082],            // 495 nm
    [0.0049, 0.323, 0.272, 109.354],              // 500 nm
    [0.0024, 0.4073, 0.2123, 108.578],            // 505 nm
    [0.0093, 0.503, 0.1582, 107.802],             // 510 nm
    [0.0291, 0.6082, 0.1117, 106.296],            // 515 nm
    [0.06327, 0.71, 0.07824999, 104.79],          // 520 nm
    [0.1096, 0.7932, 0.05725001, 106.239],        // 525 nm
    [0.1655, 0.862, 0.04216, 107.689],            // 530 nm
    [0.2257499, 0.9148501, 0.02984, 106.047],     // 535 nm
    [0.2904, 0.954, 0.0203, 104.405],             // 540 nm
    [0.3597, 0.9803, 0.0134, 104.225],            // 545 nm
    [0.4334499, 0.9949501, 0.008749999, 104.046], // 550 nm
    [0.5120501, 1.0, 0.005749999, 102.023],       // 555 nm
    [0.5945, 0.995, 0.0039, 100.0],               // 560 nm
    [0.6784, 0.9786, 0.002749999, 98.1671],       // 565 nm
    [0.7621, 0.952, 0.0021, 96.3342],             // 570 nm
    [0.8425, 0.9154, 0.0018, 96.0611],            // 575 nm
    [0.9163, 0.87, 0.001650001, 95.788],          // 580 nm
    [0.9786, 0.8163, 0.0014, 92.2368],            // 585 nm
    [1.0263, 0.757, 0.0011, 88.6856],             // 590 nm
    [1.0567, 0.6949, 0.001, 89.3459],             // 595 nm
    [1.0622, 0.631, 0.0008, 90.0062],             // 600 nm
    [1.0456, 0.5668, 0.0006, 89.8026],            // 605 nm
    [1.0026, 0.503, 0.00034, 89.5991],            // 610 nm
    [0.9384, 0.4412, 0.00024, 88.6489],           // 615 nm
    [0.8544499, 0.381, 0.00019, 87.6987],         // 620 nm
    [0.7514, 0.321, 0.0001, 85.4936],             // 625 nm
    [0.6424, 0.265, 4.999999e-05, 83.2886],       // 630 nm
    [0.5419, 0.217, 3e-05, 83.4939],              // 635 nm
    [0.4479, 0.175, 2e-05, 83.6992],              // 640 nm
    [0.3608, 0.1382, 1e-05, 81.863],              // 645 nm
    [0.2835, 0.107, -1.905824131e-21, 80.0268],   // 650 nm
    [0.2187, 0.0816, 0.0, 80.1207],               // 655 nm
    [0.1649, 0.061, 0.0, 80.2146],                // 660 nm
    [0.1212, 0.04458, 0.0, 81.2462],              // 665 nm
    [0.0874, 0.032, 0.0, 82.2778],                // 670 nm
    [0.0636, 0.0232, 0.0, 80.281],                // 675 nm
    [0.04677, 0.017, 0.0, 78.2842],               // 680 nm
    [0.0329, 0.01192, 0.0, 74.0027],              // 685 nm
    [0.0227, 0.00821, 0.0, 69.7213],              // 690 nm
    [0.01584, 0.005723, 0.0, 70.6652],            // 695 nm
    [0.01135916, 0.004102, 0.0, 71.6091],         // 700 nm
    [0.008110916, 0.002929, 0.0, 72.979],         // 705 nm
    [0.005790346, 0.002091, 0.0, 74.349],         // 710 nm
    [0.004109457, 0.001484, 0.0, 67.9765],        // 715 nm
    [0.002899327, 0.001047, 0.0, 61.604],         // 720 nm
    [0.00204919, 0.00074, 0.0, 65.7448],          // 725 nm
    [0.001439971, 0.00052, 0.0, 69.8856],         // 730 nm
    [0.0009999493, 0.0003611, 0.0, 72.4863],      // 735 nm
    [0.0006900786, 0.0002492, 0.0, 75.087],       // 740 nm
    [0.0004760213, 0.0001719, 0.0, 69.3398],      // 745 nm
    [0.0003323011, 0.00012, 0.0, 63.5927],        // 750 nm
    [0.0002348261, 8.48e-05, 0.0, 55.0054],       // 755 nm
    [0.0001661505, 6e-05, 0.0, 46.4182],          // 760 nm
    [0.000117413, 4.24e-05, 0.0, 56.6118],        // 765 nm
    [8.307527e-05, 3e-05, 0.0, 66.8054],          // 770 nm
    [5.870652e-05, 2.12e-05, 0.0, 65.0941],       // 775 nm
    [4.150994e-05, 1.499e-05, 0.0, 63.3828],      // 780 nm
];

/// The sRGB matrix from CIE XYZ (D65 white) to linear R, G, B (IEC 61966-2-1:1999).
const XYZ_TO_LINEAR_SRGB: [[f64; 3]; 3] = [
    [3.2406, -1.5372, -0.4986],
    [-0.9689, 1.8758, 0.0415],
    [0.0557, -0.2040, 1.0570],
];

/// The wavelengths of the tables, nm in standard air: 380, 385, …, 780.
pub fn wavelengths_nm() -> impl Iterator<Item = f64> {
    (0..POINTS).map(|i| FIRST_NM + STEP_NM * i as f64)
}

/// A colour as the eye sees it: tristimulus values, chromaticity and sRGB.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Colour {
    /// X, Y, Z, normalised so that a perfect transmitter has Y = 1 (Y is the luminous
    /// transmittance).
    pub xyz: [f64; 3],
    /// Chromaticity x, y; `None` for black (X + Y + Z = 0).
    pub chromaticity: Option<[f64; 2]>,
    /// sRGB, 8 bits per component, clipped to the gamut.
    pub srgb: [u8; 3],
    /// Whether clipping moved a component by more than half an 8-bit step.
    pub outside_srgb: bool,
}

/// The colour in D65 white light of a filter whose transmittance at the tables' wavelengths
/// ([`wavelengths_nm`]) is `transmittance` (one value per wavelength, 0 to 1 for a passive
/// filter; values are used as given).
pub fn colour_of(transmittance: &[f64; POINTS]) -> Colour {
    let mut xyz = [0.0; 3];
    let mut norm = 0.0;
    for (row, t) in TABLE.iter().zip(transmittance) {
        let s = row[3];
        for (c, cmf) in xyz.iter_mut().zip(&row[..3]) {
            *c += s * t * cmf;
        }
        norm += s * row[1];
    }
    let xyz = xyz.map(|c| c / norm);
    let sum = xyz[0] + xyz[1] + xyz[2];
    let chromaticity = (sum > 0.0).then(|| [xyz[0] / sum, xyz[1] / sum]);
    let (srgb, outside_srgb) = srgb_of(xyz);
    Colour {
        xyz,
        chromaticity,
        srgb,
        outside_srgb,
    }
}

/// The 8-bit sRGB encoding of `xyz`, and whether clipping moved a component by more than half
/// an 8-bit step.
fn srgb_of(xyz: [f64; 3]) -> ([u8; 3], bool) {
    let mut outside = false;
    let srgb = XYZ_TO_LINEAR_SRGB.map(|row| {
        let linear = row[0] * xyz[0] + row[1] * xyz[1] + row[2] * xyz[2];
        let encoded = encode(linear);
        let clipped = encoded.clamp(0.0, 1.0);
        outside |= (encoded - clipped).abs() * 255.0 > 0.5 || encoded.is_nan();
        // Clamped to 0-255 first, so the cast cannot wrap; NaN casts to 0.
        (clipped * 255.0).round() as u8
    });
    (srgb, outside)
}

/// The sRGB transfer function (IEC 61966-2-1), extended oddly below zero so that a clipped
/// negative component keeps its size for the gamut test.
fn encode(v: f64) -> f64 {
    if v.abs() <= 0.003_130_8 {
        12.92 * v
    } else {
        v.signum() * (1.055 * v.abs().powf(1.0 / 2.4) - 0.055)
    }
}

/// `rgb` as the hexadecimal colour "#rrggbb".
pub fn hex(rgb: [u8; 3]) -> String {
    format!("#{:02x}{:02x}{:02x}", rgb[0], rgb[1], rgb[2])
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_perfect_transmitter_shows_the_d65_white_point() {
        // The D65 white point of the CIE 1931 observer, x = 0.31271, y = 0.32902 (CIE 015:2018,
        // from memory; commonly rounded to 0.3127, 0.3290); the 5 nm sum lands within 1e-4.
        let c = colour_of(&[1.0; POINTS]);
        assert!((c.xyz[1] - 1.0).abs() < 1e-15);
        let [x, y] = c.chromaticity.unwrap();
        assert!((x - 0.31271).abs() < 1e-4 && (y - 0.32902).abs() < 1e-4, "{x} {y}");
        // sRGB white (IEC 61966-2-1: D65 maps to R = G = B = 1).
        assert_eq!(c.srgb, [255, 255, 255]);
        assert!(!c.outside_srgb);
        assert_eq!(hex(c.srgb), "#ffffff");
    }

    #[test]
    fn black_has_no_chromaticity_and_grey_keeps_it() {
        let black = colour_of(&[0.0; POINTS]);
        assert_eq!(black.chromaticity, None);
        assert_eq!(black.srgb, [0, 0, 0]);
        // A neutral filter of 18 % luminous transmittance is mid grey: 0.18 encodes to 118/255
        // (IEC 61966-2-1 transfer function; common practice: "18 % grey").
        let grey = colour_of(&[0.18; POINTS]);
        assert!((grey.xyz[1] - 0.18).abs() < 1e-15);
        let white = colour_of(&[1.0; POINTS]).chromaticity.unwrap();
        let g = grey.chromaticity.unwrap();
        assert!((g[0] - white[0]).abs() < 1e-15 && (g[1] - white[1]).abs() < 1e-15);
        assert!(grey.srgb.iter().all(|&c| c.abs_diff(118) <= 1), "{:?}", grey.srgb);
    }

    #[test]
    fn narrow_bands_fall_on_the_spectrum_locus() {
        // A filter passing only 520 nm shows the spectral colour of that wavelength, whose
        // chromaticity is x̄/(x̄+ȳ+z̄) there (CIE 1931 table: 0.0743, 0.8338 at 520 nm, from
        // memory), far outside the sRGB gamut.
        let mut t = [0.0; POINTS];
        t[28] = 1.0; // 380 + 28·5 = 520 nm
        let c = colour_of(&t);
        let [x, y] = c.chromaticity.unwrap();
        assert!((x - 0.0743).abs() < 1e-3 && (y - 0.8338).abs() < 1e-3, "{x} {y}");
        assert!(c.outside_srgb);
        // Long-wave red passes as red: R largest.
        let mut red = [0.0; POINTS];
        red[50..].fill(1.0); // 630 nm and beyond
        let c = colour_of(&red);
        assert!(c.srgb[0] > c.srgb[1] && c.srgb[0] > c.srgb[2], "{:?}", c.srgb);
    }

    #[test]
    fn the_table_runs_from_380_to_780_nm() {
        let w: Vec<f64> = wavelengths_nm().collect();
        assert_eq!((w[0], w[POINTS - 1], w.len()), (380.0, 780.0, 81));
        // ȳ peaks at 555 nm with 1.0 (the definition of the photopic luminosity function).
        let peak = TABLE
            .iter()
            .enumerate()
            .max_by(|a, b| a.1[1].total_cmp(&b.1[1]))
            .unwrap();
        assert_eq!((peak.0, peak.1[1]), (35, 1.0));
        // D65 is tabulated relative to 100 at 560 nm.
        assert_eq!(TABLE[36][3], 100.0);
    }
}
