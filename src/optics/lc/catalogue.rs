//! The catalogue of nematic liquid crystals: published single-compound nematics with their
//! indices (dispersion), elastic constants and static permittivities, each value cited beside it.
//!
//! Indices follow the three-term Cauchy form n(λ) = A + B/λ² + C/λ⁴ (λ in µm) fitted to the
//! visible and near infrared at about 25 °C; elastic and dielectric constants are single values
//! at about the same temperature (the permittivities at 1 kHz, the usual drive frequency). The
//! catalogue holds these at one temperature only: a scenario's `temperature_c` does not change
//! them. Each entry also records the band about that temperature in which they are used without
//! remark and the nematic's clearing point, above which it is an isotropic liquid and the entry
//! does not describe it at all (the contract refuses such a temperature). Values marked "from
//! memory" were recalled, not copied from the paper at hand.

use crate::optics::lc::nematic::Nematic;

/// One catalogued nematic.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NematicEntry {
    /// Catalogue key (lower case).
    pub key: &'static str,
    /// Human-readable name.
    pub name: &'static str,
    /// Cauchy coefficients of n_e: A, B (µm²), C (µm⁴).
    pub ne_cauchy: [f64; 3],
    /// Cauchy coefficients of n_o.
    pub no_cauchy: [f64; 3],
    /// Wavelength range of the index fit, nm.
    pub range_nm: (f64, f64),
    /// K11, K22, K33 in pN.
    pub k_pn: [f64; 3],
    /// ε∥ and ε⊥ (static, 1 kHz).
    pub eps: [f64; 2],
    /// Temperatures at which the constants are used without remark, °C: about their measurement.
    pub quiet_c: (f64, f64),
    /// Nematic–isotropic transition (clearing point), °C.
    pub clearing_c: f64,
    /// Where the numbers come from.
    pub source: &'static str,
}

/// Every catalogued nematic.
pub const NEMATICS: [NematicEntry; 1] = [NematicEntry {
    key: "5cb",
    name: "4-cyano-4'-pentylbiphenyl (5CB), 25 °C",
    // J. Li and S.-T. Wu, "Extended Cauchy equations for the refractive indices of liquid
    // crystals", J. Appl. Phys. 95, 896 (2004), 5CB at 25.1 °C (from memory): n_e ≈ 1.716 and
    // n_o ≈ 1.533 at 589 nm.
    ne_cauchy: [1.6795, 0.0048, 0.0027],
    no_cauchy: [1.5187, 0.0016, 0.0011],
    range_nm: (450.0, 1550.0),
    // N. V. Madhusudana and R. Pratibha, Mol. Cryst. Liq. Cryst. 89, 249 (1982), and
    // M. J. Bradshaw, E. P. Raynes, J. D. Bunning and T. E. Faber, J. Physique 46, 1513 (1985),
    // about 7 K below the clearing point (from memory): K11 = 6.4, K22 = 3.0, K33 = 10.0 pN.
    k_pn: [6.4, 3.0, 10.0],
    // Bradshaw et al. (1985), from memory: ε∥ = 19.7, ε⊥ = 6.7 at 1 kHz (Δε = 13.0).
    eps: [19.7, 6.7],
    // Measured at about 25 °C; used without remark from 20 to 30 °C. 5CB is nematic from about
    // 24 °C (it supercools in thin cells, so room temperature is usual) and clears at about
    // 35 °C (common practice, from memory: 35.0–35.3 °C is quoted). Its birefringence falls
    // steeply as the clearing point nears, which these fixed constants do not follow.
    quiet_c: (20.0, 30.0),
    clearing_c: 35.0,
    source: "indices: Li & Wu, J. Appl. Phys. 95, 896 (2004); elastic and dielectric constants: Bradshaw et al., J. Physique 46, 1513 (1985)",
}];

/// The catalogued nematic with this key (any case).
pub fn find(key: &str) -> Option<&'static NematicEntry> {
    NEMATICS.iter().find(|e| e.key.eq_ignore_ascii_case(key))
}

/// The catalogue's keys.
pub fn keys() -> Vec<&'static str> {
    NEMATICS.iter().map(|e| e.key).collect()
}

fn cauchy([a, b, c]: [f64; 3], um: f64) -> f64 {
    let inv2 = 1.0 / (um * um);
    a + b * inv2 + c * inv2 * inv2
}

impl NematicEntry {
    /// Its constants at vacuum wavelength `wavelength_um` (the Cauchy fits are in air and the
    /// difference, 3·10⁻⁴ of λ, is far below their accuracy).
    pub fn at(&self, wavelength_um: f64) -> Nematic {
        Nematic {
            no: cauchy(self.no_cauchy, wavelength_um),
            ne: cauchy(self.ne_cauchy, wavelength_um),
            k11_pn: self.k_pn[0],
            k22_pn: self.k_pn[1],
            k33_pn: self.k_pn[2],
            eps_parallel: self.eps[0],
            eps_perpendicular: self.eps[1],
        }
    }

    /// Whether `nm` lies inside the index fit's range.
    pub fn covers(&self, nm: f64) -> bool {
        nm >= self.range_nm.0 && nm <= self.range_nm.1
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_within;

    /// 5CB at 589 nm: n_e ≈ 1.716, n_o ≈ 1.533, Δn ≈ 0.18 (Li & Wu 2004, from memory); its
    /// Freedericksz threshold near 0.7 V (common practice for 5CB planar cells).
    #[test]
    fn five_cb_reference_values() {
        let lc = find("5CB").unwrap().at(0.589);
        assert_within(lc.ne, 1.716, 2e-3, "n_e of 5CB at 589 nm");
        assert_within(lc.no, 1.533, 2e-3, "n_o of 5CB at 589 nm");
        assert!((lc.threshold_v(0.0) - 0.74).abs() < 0.05, "{}", lc.threshold_v(0.0));
        assert_eq!(keys(), vec!["5cb"]);
        assert!(find("8cb").is_none());
    }
}
