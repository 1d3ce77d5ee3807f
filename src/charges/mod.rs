//! Charges of BPS states: the charge lattice of the spectral curve, the
//! intersection pairing, and the Kontsevich-Soibelman product.

pub mod intmat;
pub mod ks;
pub mod lattice;
