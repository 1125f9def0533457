// INVENTED EXAMPLE: describes no real product. Discrete glue logic of the levelcross demo
// controller board. design.yaml gives glue33 the module default LVCMOS33 on VCC3V3 and
// ttl_strobe5 the module default TTL5 on VCC5V0.

// 3.3 V glue between the microcontroller's general-purpose outputs and the status LEDs.
// gpo[0] set_n, gpo[1] rst_n, gpo[2] led_req, gpo[3] dbg_a, gpo[4] dbg_sel_a, gpo[5] dbg_sel_b.
module glue33 (
  input        clk,
  input  [5:0] gpo,
  output       latch_q,
  output       dbg,
  output       led_hb,
  output       led_stat
);
  wire sr_qn, hb_d, dbg_idle;

  // seeded fault: cycle-through-logic (a set/reset latch built from two cross-coupled gates)
  nand g_sr_set (latch_q, gpo[0], sr_qn);
  nand g_sr_rst (sr_qn, gpo[1], latch_q);

  // Must not fire: a loop through a flip-flop (the heartbeat divides the clock by two).
  dff_1b u_hb (.C(clk), .D(hb_d), .Q(led_hb));
  not g_hb_inv (hb_d, led_hb);

  // seeded fault: outputs-shorted (two push-pull gate outputs wired to one net)
  buf g_stat_req (led_stat, gpo[2]);
  not g_stat_hb  (led_stat, led_hb);

  // Must not fire: a constant tie (the idle level of the debug line's second source).
  assign dbg_idle = 1'b0;

  // seeded fault: shared-tristate-bus (two tri-state gates on one line; a note)
  bufif1 g_dbg_a (dbg, gpo[3], gpo[4]);
  bufif1 g_dbg_b (dbg, dbg_idle, gpo[5]);
endmodule

// Small 5 V TTL sub-block: the actuator's sync pulse, buffered once, strobes eleven channel
// buffers towards the actuator connector.
module ttl_strobe5 (
  input         strobe_in,
  output [10:0] ch
);
  wire strobe;

  buf u_drv (strobe, strobe_in);
  // seeded fault: drive-overload (one TTL5 output into eleven TTL5 inputs; ten is the limit)
  buf u_ch[10:0] (ch, strobe);
endmodule
