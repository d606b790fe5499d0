//! The catalogue of nematic liquid crystals: published single-compound nematics with their
//! indices (dispersion), elastic constants and static permittivities, each value cited beside it.
//!
//! Indices follow the three-term Cauchy form n(λ) = A + B/λ² + C/λ⁴ (λ in µm) fitted to the
//! visible and near infrared at about 25 °C; elastic and dielectric constants are single values
//! at about the same temperature (the permittivities at 1 kHz, the usual drive frequency).
//!
//! Temperature. A nematic's anisotropies follow its orientational order parameter S(T), which
//! falls as the clearing point nears. The catalogue takes S in Haller's form,
//! S ∝ (1 − T/T_c)^β (I. Haller, Prog. Solid State Chem. 10, 103 (1975), from memory), so that relative to the
//! reference temperature T₀ the order scales by r(T) = ((T_c − T)/(T_c − T₀))^β, and moves the
//! constants with it:
//! - birefringence Δn(λ, T) = r·Δn(λ, T₀) at every wavelength, the mean index
//!   ⟨n⟩ = (n_e + 2n_o)/3 moving linearly, ⟨n⟩(T) = ⟨n⟩(T₀) + m·(T − T₀) (the form of the
//!   four-parameter model of J. Li, S. Gauza and S.-T. Wu, J. Appl. Phys. 96, 19 (2004), from
//!   memory), with m fitted to the same measurement as T_c where the entry gives it and 0 (held)
//!   where it does not; m moves n_e and n_o together and the retardance not at all;
//! - elastic constants K_ii ∝ S² and dielectric anisotropy Δε ∝ S with the mean permittivity
//!   held (mean-field scaling: P. G. de Gennes and J. Prost, *The Physics of Liquid Crystals*,
//!   2nd ed. (1993), §3.1, from memory; Maier–Meier, without the 1/T of its dipolar term, 5 % over 20–35 °C),
//!   so the Freedericksz threshold scales as √r.
//!
//! β of each entry is a published exponent and T_c is fitted to a published measurement of Δn at
//! several temperatures (both named beside them); T_c so fitted lies a little above the clearing
//! point, where the
//! nematic–isotropic transition (weakly first order) cuts the curve off. Each entry records the
//! band of that measurement, outside which the answer says the model is extrapolated, and the
//! clearing point, at and above which the nematic is an isotropic liquid and the entry does not
//! describe it at all (the contract refuses such a temperature). Values marked "from memory"
//! were recalled, not copied from the paper at hand.

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
    /// Temperature at which the indices, elastic and dielectric constants above hold, °C.
    pub reference_c: f64,
    /// Haller's T_c of the order parameter's temperature model, °C (above the clearing point).
    pub haller_tc_c: f64,
    /// Haller's exponent β.
    pub haller_beta: f64,
    /// Temperatures of the measurement the model is fitted to, °C: inside, it is used without remark.
    pub quiet_c: (f64, f64),
    /// Nematic–isotropic transition (clearing point), °C.
    pub clearing_c: f64,
    /// Slope m of the mean index (n_e + 2n_o)/3 with temperature, 1/K (0: held).
    pub mean_index_per_k: f64,
    /// Why the elastic and dielectric constants are less certain than the indices, where they
    /// are (recalled, not read from a measurement at hand); cells of this nematic carry it as a
    /// warning. `None` where they are cited.
    pub constants_note: Option<&'static str>,
    /// Where the numbers come from.
    pub source: &'static str,
}

/// Every catalogued nematic.
pub const NEMATICS: [NematicEntry; 2] = [
    NematicEntry {
        key: "5cb",
        name: "4-cyano-4'-pentylbiphenyl (5CB)",
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
        reference_c: 25.0,
        // β: the mean critical exponent of the nCB homologues (n = 5–8), 0.241 ± 0.012, measured
        // from their refractive indices in "Determination of the order parameter and its critical
        // exponent for nCB (n=5–8) liquid crystals from refractive index data", Liquid Crystals,
        // pages 229–240 (received 2003, published 2004; the exponent and these details as its
        // abstract page gives them; the first author, M. Chirtoc, and the volume, 31, from memory). T_c: fitted here (least squares on
        // Δn, with β so fixed) to 5CB's indices of S.-T. Wu, C.-S. Wu, M. Warenghem and
        // M. Ismaili, "Refractive index dispersions of liquid crystals", Opt. Eng. 32, 1775 (1993),
        // at 589 nm and 25.1, 32.6 and 34.8 °C, as the refractiveindex.info database holds them;
        // residuals 0.0034 at most in Δn. Its n_e formula at 27.2 °C and at 29.9 °C is one and the
        // same, so that n_e's temperature is unknown and it is left out. The other wavelengths and
        // n_o at every temperature are checked in tests/reference/lc_temperature_reference.py.
        haller_tc_c: 36.81,
        haller_beta: 0.241,
        // The measurement spans 25.1 to 34.8 °C. Down to 20 °C the model is a short extrapolation of
        // a smooth curve (Δn 9 % above its 25 °C value at 20 °C), used without remark because room
        // temperature is where such cells work: 5CB is nematic from about 24 °C and supercools in
        // thin cells. Below 20 °C the answer says the model is extrapolated. It clears at about
        // 35 °C (common practice, from memory: 35.0–35.3 °C is quoted).
        quiet_c: (20.0, 34.8),
        clearing_c: 35.0,
        // Not fitted for 5CB: its mean index is held (the entry's numbers predate the slope).
        mean_index_per_k: 0.0,
        constants_note: None,
        source: "indices: Li & Wu, J. Appl. Phys. 95, 896 (2004); elastic and dielectric constants: Bradshaw et al., J. Physique 46, 1513 (1985); temperature: Haller's order parameter fitted to Wu et al., Opt. Eng. 32, 1775 (1993)",
    },
    NematicEntry {
        key: "5pch",
        name: "trans-4-(4-pentylcyclohexyl)benzonitrile (5PCH)",
        // J. Li, C.-H. Wen, S. Gauza, R. Lu and S.-T. Wu, "Refractive indices of liquid crystals
        // for display applications", J. Display Technol. 1, 51-61 (2005): three-term Cauchy fits
        // at 25 °C over 450-656 nm, as the refractiveindex.info database holds them (other/5PCH,
        // pages Li-e and Li-o): n_e ≈ 1.6036 and n_o ≈ 1.4876 at 589 nm.
        ne_cauchy: [1.5801, 0.0073, 0.0003],
        no_cauchy: [1.4718, 0.0049, 0.0002],
        range_nm: (450.0, 656.0),
        // From memory, uncertain (no measurement of 5PCH's elastic and dielectric constants was
        // at hand: Hp. Schad and M. A. Osman, "Elastic constants and molecular association of
        // cyano-substituted nematic liquid crystals", J. Chem. Phys. 75, 880 (1981) measured the
        // phenylcyclohexane homologues, but only its title and abstract were seen): K11 ≈ 8.5,
        // K22 ≈ 4.5, K33 ≈ 14 pN and ε∥ ≈ 15, ε⊥ ≈ 5 (Δε ≈ 10) near 25 °C, perhaps 20 % off.
        // A cell of 5PCH carries `constants_note` as a warning.
        k_pn: [8.5, 4.5, 14.0],
        eps: [15.0, 5.0],
        reference_c: 25.0,
        // β and T_c both fitted here (least squares on the ratio Δn(T)/Δn(25.0 °C), so that the
        // two measurements' 4 % disagreement in Δn drops out) to 5PCH's indices of S.-T. Wu,
        // C.-S. Wu, M. Warenghem and M. Ismaili, Opt. Eng. 32, 1775 (1993), at 589 nm and 25.0,
        // 30.4, 34.8, 40.1, 45.4, 50.8 and 53.4 °C, as the refractiveindex.info database holds
        // them (other/5PCH, pages Wu-*): ratio residuals 0.013 at most. No published exponent
        // for the phenylcyclohexanes was at hand; the nCB value, 0.241, leaves residuals of 0.038.
        // The other wavelengths, n_e and n_o are checked in
        // tests/reference/lc_temperature_reference.py.
        haller_tc_c: 54.85,
        haller_beta: 0.110,
        // The measurement spans 25.0 to 53.4 °C; outside, the answer says the model is
        // extrapolated (5PCH melts near 30 °C and supercools in thin cells, from memory). It
        // clears at about 54.5 °C (327.6 K, a chemical supplier's product page; 54-55 °C is
        // quoted in the literature, from memory): above the last measured temperature, below
        // the fitted T_c.
        quiet_c: (25.0, 53.4),
        clearing_c: 54.5,
        // Fitted to the same measurement (589 nm): −3.10e-4 /K, residuals 0.001 at most; the
        // slope runs from −3.2e-4 at 450 nm to −3.1e-4 /K at 700 nm.
        mean_index_per_k: -3.10e-4,
        constants_note: Some(
            "5PCH's elastic and dielectric constants are recalled (about 20 % uncertain), not read from a \
             measurement at hand, so its threshold and voltage response are estimates",
        ),
        source: "indices: Li et al., J. Display Technol. 1, 51 (2005); temperature: Haller's order parameter and a linear mean index fitted to Wu et al., Opt. Eng. 32, 1775 (1993); elastic and dielectric constants recalled, unverified",
    },
];

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
    /// The order parameter at `temperature_c` relative to the reference temperature's,
    /// r = ((T_c − T)/(T_c − T₀))^β; meant for temperatures below the clearing point (the
    /// contract refuses others), 0 at and above Haller's T_c.
    pub fn order_ratio(&self, temperature_c: f64) -> f64 {
        let span = self.haller_tc_c - self.reference_c;
        ((self.haller_tc_c - temperature_c).max(0.0) / span).powf(self.haller_beta)
    }

    /// Its constants at vacuum wavelength `wavelength_um` (the Cauchy fits are in air and the
    /// difference, 3·10⁻⁴ of λ, is far below their accuracy) and `temperature_c`, moved from the
    /// reference temperature with the order parameter and the mean index's slope (see the
    /// module's header).
    pub fn at(&self, wavelength_um: f64, temperature_c: f64) -> Nematic {
        let r = self.order_ratio(temperature_c);
        let (no, ne) = (
            cauchy(self.no_cauchy, wavelength_um),
            cauchy(self.ne_cauchy, wavelength_um),
        );
        let mean_n = (ne + 2.0 * no) / 3.0 + self.mean_index_per_k * (temperature_c - self.reference_c);
        let dn = r * (ne - no);
        let [eps_par, eps_perp] = self.eps;
        let mean_eps = (eps_par + 2.0 * eps_perp) / 3.0;
        let de = r * (eps_par - eps_perp);
        let [k11, k22, k33] = self.k_pn.map(|k| k * r * r);
        Nematic {
            no: mean_n - dn / 3.0,
            ne: mean_n + 2.0 * dn / 3.0,
            k11_pn: k11,
            k22_pn: k22,
            k33_pn: k33,
            eps_parallel: mean_eps + 2.0 * de / 3.0,
            eps_perpendicular: mean_eps - de / 3.0,
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
        let lc = find("5CB").unwrap().at(0.589, 25.0);
        assert_within(lc.ne, 1.716, 2e-3, "n_e of 5CB at 589 nm");
        assert_within(lc.no, 1.533, 2e-3, "n_o of 5CB at 589 nm");
        assert!((lc.threshold_v(0.0) - 0.74).abs() < 0.05, "{}", lc.threshold_v(0.0));
        assert_eq!(keys(), vec!["5cb", "5pch"]);
        assert!(find("8cb").is_none());
    }

    /// At the reference temperature the constants are the catalogue's; warmer, Δn, Δε and K
    /// fall together with the mean index and mean permittivity held, and the threshold falls as
    /// √r (the scalings of the module's header).
    #[test]
    fn five_cb_moves_with_its_order_parameter() {
        let e = find("5cb").unwrap();
        let (cold, warm) = (e.at(0.633, 25.0), e.at(0.633, 33.0));
        assert_within(cold.ne, cauchy(e.ne_cauchy, 0.633), 1e-15, "n_e at the reference");
        assert_within(cold.k11_pn, 6.4, 1e-15, "K11 at the reference");
        let r = e.order_ratio(33.0);
        assert!(r > 0.7 && r < 0.9, "{r}");
        assert_within(warm.ne - warm.no, r * (cold.ne - cold.no), 1e-15, "Δn scales with r");
        assert_within(
            warm.ne + 2.0 * warm.no,
            cold.ne + 2.0 * cold.no,
            1e-14,
            "mean index held",
        );
        assert_within(warm.delta_eps(), r * cold.delta_eps(), 1e-13, "Δε scales with r");
        assert_within(warm.k33_pn, r * r * cold.k33_pn, 1e-13, "K33 scales with r²");
        assert_within(
            warm.threshold_v(0.0),
            r.sqrt() * cold.threshold_v(0.0),
            1e-12,
            "threshold ∝ √r",
        );
        assert!(e.order_ratio(20.0) > 1.0 && e.order_ratio(e.haller_tc_c + 1.0) == 0.0);
    }

    /// 5PCH at 589 nm and 25 °C: Li et al.'s (2005) fits give n_e ≈ 1.6036, n_o ≈ 1.4876 (the
    /// refractiveindex.info database, other/5PCH); warmer, Δn follows r and the mean index falls
    /// by the fitted slope, and the entry warns that its elastic constants are recalled.
    #[test]
    fn five_pch_reference_values_and_mean_index_slope() {
        let e = find("5PCH").unwrap();
        let lc = e.at(0.589, 25.0);
        assert_within(lc.ne, 1.6036, 1e-4, "n_e of 5PCH at 589 nm, Li et al. 2005");
        assert_within(lc.no, 1.4876, 1e-4, "n_o of 5PCH at 589 nm, Li et al. 2005");
        let warm = e.at(0.589, 45.0);
        let mean = |n: &Nematic| (n.ne + 2.0 * n.no) / 3.0;
        assert_within(mean(&warm) - mean(&lc), -3.10e-4 * 20.0, 1e-14, "mean index slope");
        let r = e.order_ratio(45.0);
        assert_within(warm.ne - warm.no, r * (lc.ne - lc.no), 1e-14, "Δn scales with r");
        assert!(e.constants_note.is_some() && find("5cb").unwrap().constants_note.is_none());
        assert!(e.haller_tc_c > e.clearing_c && e.clearing_c > e.quiet_c.1);
    }
}
