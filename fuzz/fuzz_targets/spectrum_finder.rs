//! Fuzz target: see [`wallflower_fuzz::spectrum_finder`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    wallflower_fuzz::spectrum_finder(data);
});
