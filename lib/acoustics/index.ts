/** Pure acoustics for the lab: one-third-octave bands, response files and Thiele–Small parameters. */
export * from "./bands";
export * from "./response";
export * from "./thiele-small";
