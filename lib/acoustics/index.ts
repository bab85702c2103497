/** Pure acoustics for the lab: one-third-octave bands, response files, Thiele–Small parameters, and how frequencies and levels are written. */
export * from "./bands";
export * from "./response";
export * from "./thiele-small";
export * from "./format";
