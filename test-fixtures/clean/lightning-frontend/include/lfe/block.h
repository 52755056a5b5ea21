// The minimal stream-block framework the lightning-frontend blocks build on: a block declares its
// ports' item sizes and gets untyped buffers of noutput_items items in work().
#ifndef LFE_BLOCK_H
#define LFE_BLOCK_H

#include <cstddef>
#include <string>

struct io_signature {
    int min_ports;
    int max_ports;
    size_t item_size;
    static io_signature make(int min_ports, int max_ports, size_t item_size) {
        return io_signature{min_ports, max_ports, item_size};
    }
};

class block {
public:
    block(const std::string &name, io_signature in, io_signature out) : name_(name), in_(in), out_(out) {}
    virtual ~block() = default;
    virtual int work(int noutput_items, const void *const *input_items, void *const *output_items) = 0;

private:
    std::string name_;
    io_signature in_;
    io_signature out_;
};

#endif
