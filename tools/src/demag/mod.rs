//! Demagnetizing factors of a solved core and the formulas users substitute for them.
//!
//! Definitions (Chen, Brug & Goldfarb, IEEE Trans. Magn. 27(4), 3601, 1991; references.md §1):
//! the **magnetometric** factor Nm is the ratio −⟨H_d⟩/⟨M⟩ averaged over the core's volume (it
//! fixes the moment), the **fluxmetric** factor Nf the same ratio averaged over the mid-plane
//! cross-section (what a short central pick-up coil sees). For a linear core in a uniform axial
//! field H0: m = V χ H0/(1 + χ Nm) and ⟨M⟩_mid = χ H0/(1 + χ Nf), so
//! Nm = V H0/m − 1/χ and Nf = H0/⟨M⟩_mid − 1/χ. For χ = 0 a core with a prescribed uniform
//! magnetization M0 gives them without the 1/χ cancellation: Nm = −⟨H_z⟩_vol/M0,
//! Nf = −⟨H_z⟩_mid/M0.
//!
//! [`averages`] reads the field quantities off a solution, [`factors`] turns them into Nm and Nf
//! with error bars, [`formulas`] evaluates the closed forms and approximations beside them,
//! [`table`] reads a finished study back for its JSON and plots.

pub mod averages;
pub mod case;
pub mod factors;
pub mod formulas;
pub mod table;
