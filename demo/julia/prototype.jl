# Prototype of the Brackwater level head (invented demo).

# GELU, tanh approximation:
# f(x) = 0.5 x (1 + tanh(sqrt(2/pi) (x + 0.044715 x^3)))
gelu_t(x) = 0.5 * x * (1 + tanh(sqrt(2 / pi) * (x + 0.044715 * x^3)))

function gelu_t_grad(x)
    u = sqrt(2 / pi) * (x + 0.044715 * x^3)
    t = tanh(u)
    return 0.5 * (1 + t) + 0.5 * x * (1 - t^2) * sqrt(2 / pi)
end
