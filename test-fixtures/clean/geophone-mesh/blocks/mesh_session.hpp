// A mesh session: opens the mesh through gm_mesh_open's out-parameter and closes it once.
#pragma once

#include "gm/gm.h"
#include "gm_refs.hpp"

namespace geo {

class mesh_session {
public:
    mesh_session(const gm_cfg &cfg, const calib_ref &calib);
    ~mesh_session();
    mesh_session(const mesh_session &) = delete;
    mesh_session &operator=(const mesh_session &) = delete;

    /// GM_OK when the mesh opened.
    int status() const { return status_; }
    uint32_t feed(const tally_ref &tally, uint32_t node, const float *samples, size_t n);
    /// The mesh's own table, as a new reference.
    calib_ref calib() const;

private:
    gm_mesh *mesh_ = nullptr;
    int status_ = GM_EINVAL;
};

} // namespace geo
