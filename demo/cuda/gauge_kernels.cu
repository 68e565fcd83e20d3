// Gauge-feature kernels for the Brackwater forecaster (invented demo).
#include <cuda_runtime.h>

#define LEAK 0.01f

// leaky ReLU: f(x) = x if x > 0 else 0.01 x
__device__ float leaky(float x) {
    return x > 0.0f ? x : LEAK * x;
}

__device__ float leaky_grad(float x) {
    return x > 0.0f ? 1.0f : 0.1f;
}

__global__ void leaky_forward(const float* in, float* out, int n) {
    int i = blockIdx.x * blockDim.x + threadIdx.x;
    if (i < n) out[i] = leaky(in[i]);
}

__global__ void leaky_backward(const float* in, const float* grad_out, float* grad_in, int n) {
    int i = blockIdx.x * blockDim.x + threadIdx.x;
    if (i < n) grad_in[i] = grad_out[i] * leaky_grad(in[i]);
}

// tanh squashing of the rainfall channel: f(x) = tanh(x)
__device__ float squash(float x) {
    return tanhf(x);
}

// derivative in terms of the saved output y = tanh(x): 1 - y^2
__device__ float squash_grad_from_output(float y) {
    return 1.0f - y * y;
}
