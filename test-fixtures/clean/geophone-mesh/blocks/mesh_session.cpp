#include "mesh_session.hpp"

namespace geo {

mesh_session::mesh_session(const gm_cfg &cfg, const calib_ref &calib) {
    gm_mesh *opened = nullptr;
    status_ = gm_mesh_open(&cfg, calib.get(), &opened);
    if (status_ == GM_OK) mesh_ = opened;
}

mesh_session::~mesh_session() {
    if (mesh_ != nullptr) gm_mesh_close(mesh_);
}

uint32_t mesh_session::feed(const tally_ref &tally, uint32_t node, const float *samples, size_t n) {
    if (mesh_ == nullptr) return 0;
    return gm_mesh_feed(mesh_, tally.get(), node, samples, n);
}

calib_ref mesh_session::calib() const {
    if (mesh_ == nullptr) return calib_ref();
    return calib_ref(gm_mesh_calib(mesh_));
}

} // namespace geo
