//! Radio-telescope FPGA capture daemon: maps the sample ring for the correlator board's DMA
//! engine through VFIO and waits for "block ready" interrupts on an eventfd in an epoll loop.
#![allow(non_camel_case_types)]

use std::os::raw::c_int;

/// Mirror of the kernel's `struct vfio_iommu_type1_dma_map` (<linux/vfio.h>).
#[repr(C)]
pub struct vfio_iommu_type1_dma_map { // expect: system-mirror-differs
    pub argsz: u32,
    pub flags: u64, // the kernel has __u32 here
    pub vaddr: u64,
    pub iova: u64,
    pub size: u64,
}

/// Mirror of the C library's `struct epoll_event` (<sys/epoll.h>), without its x86_64 packing.
#[repr(C)]
pub struct epoll_event { // expect: system-mirror-differs
    pub events: u32,
    pub data: u64,
}

extern "C" {
    fn epoll_wait(epfd: c_int, events: *mut epoll_event, maxevents: c_int, timeout: c_int) -> c_int;
}

pub fn wait_blocks(epfd: c_int, ready: &mut [epoll_event; 8]) -> c_int {
    unsafe { epoll_wait(epfd, ready.as_mut_ptr(), 8, 250) }
}

/// Mirror of `struct vfio_region_info` with `index` widened: every later field moves.
#[repr(C)]
pub struct vfio_region_info { // expect: system-mirror-differs
    pub argsz: u32,
    pub flags: u32,
    pub index: u64,
    pub cap_offset: u32,
    pub size: u64,
    pub offset: u64,
}
