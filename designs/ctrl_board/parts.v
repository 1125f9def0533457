// INVENTED EXAMPLE: describes no real product. The part modules of the levelcross demo
// controller board; every name is made up. Each module is a black box: its ports give the pin
// directions, and parts.yaml gives each pin its family and rail.

// 3.3 V microcontroller (LVCMOS33 pins; one 5 V tolerant input for the actuator's fault line).
module mcu_ctrl33 (
  input        clk,
  input        fpga_rdy,
  input        fpga_stat,
  output       fpga_cfg,
  output       act_step,
  input        act_fault_n,
  input        wake_n,
  input        sense,
  output [5:0] gpo,
  input        latch_in,
  input        dbg_in
);
endmodule

// Logic fabric of the FPGA-like device: its pads go through the LVCMOS18 I/O cells of
// fpga_bank18; only the core clock pin sits on the 1.2 V core rail.
module fpga_fabric (
  input  core_clk,
  input  cfg,
  input  spare,
  input  int_n,
  input  scl_i,
  input  sda_i,
  output scl_o,
  output sda_o,
  output stat,
  output rdy
);
endmodule

// One-bit, one-direction dual-supply buffer translator: A on rail VCCA, B on rail VCCB.
module lvl_xlate_1b (input A, output B);
endmodule

// 5 V actuator driver with TTL-compatible inputs.
module act_drv5 (input step, output fault_n, output sync);
endmodule

// 1.8 V sensor on the two-wire bus, with an open-drain interrupt output.
module sens_tw18 (inout scl, inout sda, output int_n);
endmodule

// 1.2 V core clock generator.
module osc_core12 (output clk);
endmodule

// Discrete D flip-flop.
module dff_1b (input C, input D, output Q);
endmodule
