// INVENTED EXAMPLE: describes no real product. The 1.8 V I/O bank of an FPGA-like device on
// the levelcross demo controller board. Every pad passes through an I/O cell (a gate
// primitive); design.yaml gives the module the default family LVCMOS18 on VCC1V8 and makes the
// two bus driver cells open-drain (family OD-TWOWIRE).
module fpga_bank18 (
  input  core_clk,    // dedicated core clock pin, straight to the fabric (1.2 V)
  input  cfg_pad,
  input  spare_pad,
  input  int_pad,
  output stat_pad,
  output rdy_pad,
  inout  scl_pad,
  inout  sda_pad
);
  wire cfg, spare, int_n, scl_i, sda_i, scl_o, sda_o, stat, rdy;

  // Input cells.
  buf io_cfg   (cfg, cfg_pad);
  // seeded fault: input-floating (waived in design.yaml: the pad's internal pull-up is enabled
  // by the device configuration, which the netlist does not show)
  buf io_spare (spare, spare_pad);
  buf io_int   (int_n, int_pad);
  buf io_scl_in (scl_i, scl_pad);
  buf io_sda_in (sda_i, sda_pad);

  // Open-drain bus cells: with family OD-TWOWIRE they only pull their pad low.
  buf io_scl_od (scl_pad, scl_o);
  buf io_sda_od (sda_pad, sda_o);

  // Output cells.
  buf io_stat  (stat_pad, stat);
  buf io_rdy   (rdy_pad, rdy);

  fpga_fabric u_fabric (
    .core_clk(core_clk), .cfg(cfg), .spare(spare), .int_n(int_n),
    .scl_i(scl_i), .sda_i(sda_i), .scl_o(scl_o), .sda_o(sda_o), .stat(stat), .rdy(rdy)
  );
endmodule
