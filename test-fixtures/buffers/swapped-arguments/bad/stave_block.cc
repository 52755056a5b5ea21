// Passive-sonar receiver: one stave.
#include <vector>
#include "sonar.h"

void stave_work(std::vector<float> &in_samples, std::vector<float> &out_samples, std::vector<float> &decimated) {
    float *in = in_samples.data();
    float *out = out_samples.data();
    sonar_filter(out, in, in_samples.size()); // expect: swapped-arguments
    sonar_resample(out, decimated.size(), decimated.data(), out_samples.size()); // expect: swapped-arguments
}
