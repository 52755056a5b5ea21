// Copyable owners of the mesh core's reference-counted handles. A copy retains, a destructor
// releases, so every copy holds its own reference (the rule of five, written out).
#pragma once

#include <utility>

#include "gm/gm.h"

namespace geo {

/// One reference to a calibration table.
class calib_ref {
public:
    calib_ref() = default;
    /// Adopts a reference the caller already holds (from gm_calib_new or gm_mesh_calib).
    explicit calib_ref(const gm_calib *adopted) : c_(adopted) {}
    calib_ref(const calib_ref &other) : c_(other.c_) {
        if (c_ != nullptr) gm_calib_retain(c_);
    }
    calib_ref(calib_ref &&other) noexcept : c_(std::exchange(other.c_, nullptr)) {}
    calib_ref &operator=(const calib_ref &other) {
        if (this != &other) {
            if (other.c_ != nullptr) gm_calib_retain(other.c_);
            gm_calib_release(c_);
            c_ = other.c_;
        }
        return *this;
    }
    calib_ref &operator=(calib_ref &&other) noexcept {
        if (this != &other) {
            gm_calib_release(c_);
            c_ = std::exchange(other.c_, nullptr);
        }
        return *this;
    }
    ~calib_ref() { gm_calib_release(c_); }

    const gm_calib *get() const { return c_; }
    explicit operator bool() const { return c_ != nullptr; }
    float gain(size_t node) const { return gm_calib_gain(c_, node); }

private:
    const gm_calib *c_ = nullptr;
};

/// One reference to an event tally; copy assignment by copy-and-swap.
class tally_ref {
public:
    explicit tally_ref(uint32_t nodes) : t_(gm_tally_new(nodes)) {}
    tally_ref(const tally_ref &other) : t_(other.t_) { gm_tally_retain(t_); }
    tally_ref(tally_ref &&other) noexcept : t_(other.t_) { other.t_ = nullptr; }
    tally_ref &operator=(tally_ref other) noexcept {
        std::swap(t_, other.t_);
        return *this;
    }
    ~tally_ref() {
        if (t_) gm_tally_release(t_);
    }

    bool add(uint32_t node, float amp) const { return gm_tally_add(t_, node, amp) == GM_OK; }
    uint64_t total() const { return gm_tally_total(t_); }
    float peak() const { return gm_tally_peak(t_); }
    const gm_tally *get() const { return t_; }

private:
    const gm_tally *t_;
};

} // namespace geo
