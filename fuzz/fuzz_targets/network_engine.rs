//! Fuzz target: see [`wallflower_fuzz::network_engine`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    wallflower_fuzz::network_engine(data);
});
