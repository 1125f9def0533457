// INVENTED EXAMPLE: describes no real product. The top level of the levelcross demo
// controller board, made up to exercise every rule; no real part numbers or brands. The faults
// marked "seeded fault: <rule id>" are deliberate and listed, with their numbers, in EXPECTED.md.
module ctrl_board (
  input         clk_ref,    // 3.3 V reference clock from the connector
  input         sense_in,   // 3.3 V sense line over a cable from the connector
  output        led_hb,
  output        led_stat,
  output [10:0] coil,       // eleven 5 V TTL strobe channels to the actuator connector
  output        tp1         // test point
);
  wire core_clk;
  wire fpga_cfg, fpga_stat, fpga_rdy_18, fpga_rdy;
  wire act_step, act_fault_n, act_sync;
  wire wake_n, sens_int_n, tw_scl, tw_sda;
  wire latch_q, dbg;
  wire [5:0] gpo;

  osc_core12 u_osc (.clk(core_clk));

  fpga_bank18 u_fpga (
    .core_clk(core_clk),
    // seeded fault: input-overvoltage (a 3.3 V output straight into a 1.8 V input)
    // seeded fault: input-fed-while-unpowered (in power state ship the 1.8 V bank is off)
    .cfg_pad(fpga_cfg),
    .spare_pad(),
    // seeded fault: open-drain-unpulled (the sensor's interrupt has no pull-up)
    .int_pad(sens_int_n),
    // seeded fault: high-level-margin (a 1.8 V output straight into a 3.3 V input)
    // seeded fault: driver-unpowered (in power state ship the 1.8 V driver is off)
    .stat_pad(fpga_stat),
    // Must not fire: this 1.8 V output reaches the microcontroller through u_xlate.
    .rdy_pad(fpga_rdy_18),
    // Must not fire: the two-wire bus is a wired-AND of open-drain drivers, pulled up in
    // design.yaml.
    .scl_pad(tw_scl),
    .sda_pad(tw_sda)
  );

  sens_tw18 u_sensor (.scl(tw_scl), .sda(tw_sda), .int_n(sens_int_n));

  // Must not fire: the one crossing translated correctly (VCCA 1.8 V in, VCCB 3.3 V out).
  lvl_xlate_1b u_xlate (.A(fpga_rdy_18), .B(fpga_rdy));

  mcu_ctrl33 u_mcu (
    .clk(clk_ref),
    .fpga_rdy(fpga_rdy),
    .fpga_stat(fpga_stat),
    .fpga_cfg(fpga_cfg),
    // Must not fire in run: LVCMOS33 into the 5 V TTL-compatible input has margin to spare.
    // seeded fault: input-fed-while-unpowered (in power state standby VCC5V0 is off)
    .act_step(act_step),
    // seeded fault: driver-unpowered (in power state standby the 5 V driver is off)
    .act_fault_n(act_fault_n),
    // seeded fault: input-floating (nothing drives the wake line)
    .wake_n(wake_n),
    // seeded fault: low-level-margin (a warning: design.yaml asks 0.7 V on this cable net)
    .sense(sense_in),
    .gpo(gpo),
    .latch_in(latch_q),
    .dbg_in(dbg)
  );

  act_drv5 u_act (.step(act_step), .fault_n(act_fault_n), .sync(act_sync));

  ttl_strobe5 u_ttl (.strobe_in(act_sync), .ch(coil));

  glue33 u_glue (
    .clk(clk_ref), .gpo(gpo), .latch_q(latch_q), .dbg(dbg), .led_hb(led_hb), .led_stat(led_stat)
  );

  // seeded fault: family-unassigned (a test-point buffer no rule gives a family or a rail)
  buf u_tp (tp1, fpga_stat);
endmodule
