// The small stream framework the correlator blocks are written against. A block declares each
// port's item size with add_input_port()/add_output_port() in its constructor; work() then gets
// one untyped buffer per port, each holding noutput_items items of that size.
#ifndef XC_STREAM_H
#define XC_STREAM_H

#include <cstddef>
#include <string>
#include <vector>

class stream_block {
public:
    explicit stream_block(std::string name) : name_(std::move(name)) {}
    virtual ~stream_block() = default;
    stream_block(const stream_block &) = delete;
    stream_block &operator=(const stream_block &) = delete;

    virtual int work(int noutput_items, const void *const *input_items, void *const *output_items) = 0;

    const std::string &name() const { return name_; }
    size_t input_item_size(size_t port) const { return in_sizes_.at(port); }
    size_t output_item_size(size_t port) const { return out_sizes_.at(port); }

protected:
    void add_input_port(size_t item_size) { in_sizes_.push_back(item_size); }
    void add_output_port(size_t item_size) { out_sizes_.push_back(item_size); }

private:
    std::string name_;
    std::vector<size_t> in_sizes_;
    std::vector<size_t> out_sizes_;
};

#endif
