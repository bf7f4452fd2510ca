//! Shading: colour (sRGB transfer functions, the exact 8-bit encoder, typed colours), the
//! four-lane arithmetic of the per-pixel path, and lights, materials and reflection models in
//! linear light. Nothing here knows where it is evaluated (vertex, pixel or probe).

pub(crate) mod color;
pub(crate) mod lanes;
pub(crate) mod lighting;

pub use color::{
    encode_srgb8, encode_srgb8_reference, linear_to_srgb, linear_to_srgb_f64,
    max_thresholds_per_bucket, parse_hex, srgb8_to_linear, srgb_to_linear, srgb_to_linear_f64,
    to_hex, Rgb, SrgbEncoder,
};
pub use lanes::{F4, I4, M4, V4};
pub use lighting::{
    blinn_exponent_for_roughness, ggx_lobe, roughness_for_blinn_exponent, schlick_weight,
    smith_visibility, specular_power, specular_power4, Finish, Light, LightKind, Lighting,
    Material, ReflectionModel, DIELECTRIC_F0, MAX_LIGHTS, MIN_ROUGHNESS,
};
