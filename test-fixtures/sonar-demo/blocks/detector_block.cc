// Narrowband detector block of the passive-sonar receiver: owns one Rust detector per beam.
#include <cstddef>
#include <vector>
#include "../include/sonar_detector.h"

class detector_block {
public:
    detector_block(size_t nbins, float threshold)
        : det_(sonar_det_new(nbins, threshold)), nbins_(nbins) {}
    ~detector_block() { sonar_det_free(det_); }

    int work(const std::vector<float> &spectrum) {
        return sonar_det_update(det_, spectrum.data(), nbins_);
    }

private:
    sonar_det *det_;
    size_t nbins_;
};
