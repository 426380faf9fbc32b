//! Atmospheric absorption of sound (ISO 9613-1:1993, clause 6, equations 3–5 and
//! Annex B for the saturation vapour pressure) and the speed of sound.

/// Conditions of the air in a room.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct AirConditions {
    /// Air temperature, °C.
    pub temperature_c: f64,
    /// Relative humidity, %.
    pub humidity_pct: f64,
    /// Ambient pressure, kPa.
    pub pressure_kpa: f64,
}

impl Default for AirConditions {
    fn default() -> Self {
        Self {
            temperature_c: 20.0,
            humidity_pct: 50.0,
            pressure_kpa: 101.325,
        }
    }
}

/// Reference pressure p_r, kPa (ISO 9613-1, 3.1).
const REFERENCE_PRESSURE_KPA: f64 = 101.325;
/// Reference temperature T0, K (ISO 9613-1, 3.1).
const REFERENCE_TEMPERATURE_K: f64 = 293.15;
/// Triple-point isotherm T01, K (ISO 9613-1, Annex B).
const TRIPLE_POINT_K: f64 = 273.16;

impl AirConditions {
    /// Pure-tone attenuation coefficient α in dB/m at frequency `f_hz`
    /// (ISO 9613-1:1993, equation 5, with equations 3, 4 and B.1).
    #[must_use]
    pub fn attenuation_db_per_m(&self, f_hz: f64) -> f64 {
        let t = self.temperature_c + 273.15;
        let pa = self.pressure_kpa / REFERENCE_PRESSURE_KPA;
        let tr = t / REFERENCE_TEMPERATURE_K;
        // Molar concentration of water vapour h, % (Annex B).
        let c = -6.8346 * (TRIPLE_POINT_K / t).powf(1.261) + 4.6151;
        let psat = 10f64.powf(c);
        let h = self.humidity_pct * psat / pa;
        // Relaxation frequencies of oxygen and nitrogen, Hz (equations 3 and 4).
        let fro = pa * (24.0 + 4.04e4 * h * (0.02 + h) / (0.391 + h));
        let frn =
            pa * tr.powf(-0.5) * (9.0 + 280.0 * h * (-4.170 * (tr.powf(-1.0 / 3.0) - 1.0)).exp());
        let f2 = f_hz * f_hz;
        8.686
            * f2
            * (1.84e-11 / pa * tr.sqrt()
                + tr.powf(-2.5)
                    * (0.01275 * (-2239.1 / t).exp() / (fro + f2 / fro)
                        + 0.1068 * (-3352.0 / t).exp() / (frn + f2 / frn)))
    }

    /// Energy attenuation coefficient m in 1/m, so that energy falls as e^(−m x):
    /// m = α / (10 lg e) (Kuttruff, Room Acoustics, §4.1; ISO 9613-1 gives α in dB).
    #[must_use]
    pub fn energy_attenuation_per_m(&self, f_hz: f64) -> f64 {
        self.attenuation_db_per_m(f_hz) / (10.0 * std::f64::consts::E.log10())
    }

    /// Speed of sound in m/s: c = 343.2 √(T / 293.15 K) (ISO 9613-1:1993, eq. A.1
    /// rewritten at T0 = 293.15 K; ISO 17497-1 uses the same expression).
    #[must_use]
    pub fn speed_of_sound_m_s(&self) -> f64 {
        343.2 * ((self.temperature_c + 273.15) / REFERENCE_TEMPERATURE_K).sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn matches_reference_sheet_check_values() {
        // ../shared/reference.md §5 (formula evaluated at exact mid-band frequencies,
        // 20 °C, 50 %): 1 kHz 4.665 dB/km, 2 kHz 9.855 dB/km.
        let air = AirConditions::default();
        assert_relative_eq!(
            air.attenuation_db_per_m(1000.0) * 1e3,
            4.665,
            epsilon = 0.005
        );
        assert_relative_eq!(
            air.attenuation_db_per_m(1000.0 * 10f64.powf(0.3)) * 1e3,
            9.855,
            epsilon = 0.01
        );
    }

    #[test]
    fn speed_of_sound_at_20c() {
        // ISO 17497-1 expression: 343.2 m/s at 20 °C.
        assert_relative_eq!(
            AirConditions::default().speed_of_sound_m_s(),
            343.2,
            epsilon = 1e-9
        );
    }
}
