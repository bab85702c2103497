/**
 * The assembly station: a pair whose cabinets finished their route is built, scan by scan, into
 * two speakers from the lab's matched drive-unit sets and crossover boards. Every scan is checked
 * by one function, `checkScan`, which writes nothing; `buildSpeakers` runs the same checks again
 * inside the one transaction that writes the build, so what the browser showed cannot be trusted
 * into the register.
 */
export { ASSEMBLY_STATION } from "./station";
export { slotsOf, slotKey, type Slot } from "./slots";
export { checkScan, type ChosenPart, type ScanInput, type ScanCheck } from "./checks";
export { buildSpeakers, type BuildInput, type BuildResult } from "./build";
export { assemblyView, pairForScan, pairsAwaitingAssembly, reservedSets, type AssemblyView, type WaitingPair, type SetGroup } from "./queries";
export { pairLacquerCabinets, unpairedLacquerCabinets, type LacquerGroup } from "@/lib/cabinets/lacquer";
