// INVENTED EXAMPLE: a small glue-logic block between a 1.8 V bank and a 3.3 V peripheral, made up
// for levelcross's own demonstrations. It describes no real product.
module glue_demo (
    input  wire [3:0] fpga_gpio,   // from a 1.8 V bank
    input  wire       clk,
    input  wire       mcu_irq_n,   // from a 3.3 V controller
    output wire [3:0] periph_data, // to a 3.3 V peripheral
    output wire       led_n,
    inout  wire       sda
);
  wire [3:0] latched;
  wire       enable;

  nand u_en  (enable, fpga_gpio[0], mcu_irq_n);
  and  u_d[3:0] (periph_data, latched, {4{enable}});
  flop4 u_latch (.clk(clk), .d(fpga_gpio), .q(latched));
  not  u_led (led_n, enable);
  bufif0 u_sda (sda, 1'b0, latched[3]);   // open-drain style: drives low only
  pullup u_sda_pu (sda);
endmodule

module flop4 (input wire clk, input wire [3:0] d, output reg [3:0] q);
  always @(posedge clk) q <= d;
endmodule
