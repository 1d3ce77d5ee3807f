//! Fuzz target: see [`wallflower_fuzz::scenario_loader`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    wallflower_fuzz::scenario_loader(data);
});
