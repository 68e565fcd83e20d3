//! ELU used by the Brackwater inference service (invented demo).

const ALPHA: f32 = 1.0;

/// f(x) = x for x > 0, alpha * (exp(x) - 1) otherwise
pub fn elu(x: f32) -> f32 {
    if x > 0.0 {
        x
    } else {
        ALPHA * (x.exp() - 1.0)
    }
}

/// f'(x) = 1 for x > 0, alpha * exp(x) otherwise
pub fn elu_grad(x: f32) -> f32 {
    if x > 0.0 {
        1.0
    } else {
        ALPHA * x.exp()
    }
}
