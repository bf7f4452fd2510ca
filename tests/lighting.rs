//! The specular power without `powf` against the reference `powf` (libm 0.2, a port of
//! musl's correctly-rounded-in-practice powf).

use twinshade::lighting::specular_power;

#[test]
fn specular_power_matches_powf() {
    let mut worst_int = 0.0f64;
    let mut worst_frac = 0.0f64;
    for i in 1..=4000 {
        let x = i as f32 / 4000.0;
        for n in [1.0f32, 2.0, 5.0, 16.0, 64.0, 80.0, 255.0, 1024.0, 2048.0] {
            let (got, want) = (specular_power(x, n), libm::powf(x, n));
            if want > 1e-30 {
                worst_int = worst_int.max(((got - want) / want).abs() as f64);
            }
        }
        for n in [1.5f32, 7.25, 63.9, 100.01, 333.3, 2047.5] {
            let (got, want) = (specular_power(x, n), libm::powf(x, n));
            if want > 1e-30 {
                worst_frac = worst_frac.max(((got - want) / want).abs() as f64);
            }
        }
    }
    eprintln!("worst relative error: integer n {worst_int:.2e}, fractional n {worst_frac:.2e}");
    assert!(worst_int < 1e-4, "integer exponents: {worst_int}");
    assert!(worst_frac < 2e-4, "fractional exponents: {worst_frac}");
    assert_eq!(specular_power(1.0, 80.0), 1.0);
}
