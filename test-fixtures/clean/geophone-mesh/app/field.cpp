// Field driver: builds a calibration table, copies its owner around, streams two nodes through
// C++ callback blocks, feeds a mesh from two threads that share one retained tally, and destroys
// everything. Prints what it saw; exits non-zero on the first wrong number.
#include <cmath>
#include <cstdio>
#include <thread>
#include <utility>
#include <vector>

#include "gm/gm.h"
#include "../blocks/gm_refs.hpp"
#include "../blocks/mesh_session.hpp"
#include "../blocks/stream_block.hpp"

namespace {

int failures = 0;

void expect(bool ok, const char *what) {
    if (!ok) {
        std::printf("FAIL %s\n", what);
        ++failures;
    }
}

bool near(float a, float b) { return std::fabs(a - b) < 1e-5f; }

} // namespace

int main() {
    const float gains[4] = {1.0f, 2.0f, 0.5f, 4.0f};
    geo::calib_ref calib(gm_calib_new(gains, 4));
    expect(static_cast<bool>(calib), "calib made");

    // copies retain, assignments retain the new and release the old, moves transfer
    {
        geo::calib_ref a = calib;
        geo::calib_ref b;
        b = a;
        geo::calib_ref c(std::move(a));
        b = c;
        c = std::move(b);
        expect(near(c.gain(3), 4.0f), "gain through a copy");
        expect(gm_calib_len(calib.get()) == 4, "len borrowed");
        std::vector<geo::calib_ref> many(3, calib);
        many.push_back(many.front());
    }
    expect(near(calib.gain(9), 1.0f), "gain past the end");
    gm_calib_release(nullptr); // NULL is ignored
    gm_stream_release(nullptr);
    gm_mesh_close(nullptr);

    // two streams, each delivering to its own block through the trampoline
    {
        geo::stream_block s1(calib, 1);
        geo::stream_block s3(calib, 3);
        expect(s1.ok() && s3.ok(), "streams made");
        const float x[3] = {1.0f, -1.0f, 0.25f};
        expect(s1.push(x, 3) == 3, "push s1");
        expect(s3.push(x, 3) == 3, "push s3");
        expect(s3.push(x, 2) == 2, "push s3 again");
        expect(s1.blocks() == 1 && s3.blocks() == 2, "block counts");
        expect(s1.received().size() == 3 && near(s1.received()[2], 0.5f), "s1 scaled by 2");
        expect(s3.received().size() == 5 && near(s3.received()[4], -4.0f), "s3 scaled by 4");
        std::printf("streams %zu %zu blocks\n", s1.blocks(), s3.blocks());
    }

    // a mesh opened through the out-parameter; a bad configuration is refused
    const gm_cfg bad = {0, 1000, 0.5f};
    geo::mesh_session refused(bad, calib);
    expect(refused.status() == GM_EINVAL, "bad cfg refused");

    const gm_cfg cfg = {4, 1000, 0.9f};
    geo::mesh_session mesh(cfg, calib);
    expect(mesh.status() == GM_OK, "mesh opened");
    geo::calib_ref own = mesh.calib();
    expect(own.get() == calib.get(), "mesh shares the table");

    // two threads, each with its own retained reference to one tally
    geo::tally_ref tally(4);
    std::vector<float> wave(1000);
    for (size_t i = 0; i < wave.size(); ++i) wave[i] = (i % 10 == 0) ? 1.0f : 0.1f;
    uint32_t events[2] = {0, 0};
    std::vector<std::thread> workers;
    for (uint32_t w = 0; w < 2; ++w) {
        geo::tally_ref mine = tally;
        workers.emplace_back([mine, w, &wave, &events, own]() {
            // node 0 (gain 1) and node 1 (gain 2); a separate mesh per thread keeps the mesh
            // itself unshared, the tally is the shared state
            gm_cfg c = {4, 1000, 0.9f};
            geo::mesh_session m(c, own);
            for (int round = 0; round < 5; ++round)
                events[w] += m.feed(mine, w, wave.data(), wave.size());
            mine.add(w, 0.0f);
        });
    }
    for (auto &t : workers) t.join();
    workers.clear();

    // node 0: 100 spikes of 1.0 > 0.9 per round; node 1: gain 2, 100 spikes of 2.0 per round
    expect(events[0] == 500 && events[1] == 500, "events per thread");
    expect(tally.total() == 1002, "tally total");
    expect(near(tally.peak(), 2.0f), "tally peak");
    geo::tally_ref later(1);
    later = tally;
    expect(later.total() == 1002, "assigned tally shares counts");
    expect(mesh.feed(tally, 3, wave.data(), 10) == 1, "main mesh feed");

    std::printf("events %u %u total %llu peak %.2f\n", events[0], events[1], static_cast<unsigned long long>(tally.total()), tally.peak());
    if (failures == 0) std::printf("all checks passed\n");
    return failures == 0 ? 0 : 1;
}
