//! Fuzz target: see [`wallflower_fuzz::equation_parser`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    wallflower_fuzz::equation_parser(data);
});
