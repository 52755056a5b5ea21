// Passive-sonar receiver: one stave.
#include <vector>
#include "sonar.h"

void stave_work(std::vector<float> &in_samples, std::vector<float> &out_samples, std::vector<float> &decimated) {
    float *in = in_samples.data();
    float *out = out_samples.data();
    sonar_filter(in, out, in_samples.size());
    sonar_resample(out, out_samples.size(), decimated.data(), decimated.size());
}
