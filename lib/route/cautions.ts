import type { RouteStation } from "@/lib/vocabulary/stations";

const LIFT = "Cabinets are heavy and awkward: lift with two people or a lifting aid.";

/**
 * The usual cautions at each station of the cabinet route. Reminders only: the site's safety
 * rules, local regulations and qualified people come first (see SAFETY_DEFERRAL in lib/areas.ts).
 */
export const STATION_CAUTIONS: Record<RouteStation, string[]> = {
  press: ["The platens are hot: wear heat-resistant gloves and never reach between them.", "The press closes with great force: keep hands clear of pinch points and use the two-hand controls as fitted.", LIFT],
  trim: ["Trimming blades and router bits cut: keep guards in place and hands clear.", "Run the dust extraction; wear eye and hearing protection.", LIFT],
  brace: ["Clamps store force: release them steadily and keep fingers out of the jaws.", LIFT],
  sanding: ["Sanding raises fine wood and lacquer dust: run the extraction and wear the mask or respirator your site specifies.", "Wear hearing protection at the machines.", LIFT],
  inspection: ["Inspect under good light; lift and turn cabinets with help.", LIFT],
  lacquer: ["Solvent lacquer vapour: spray only in the booth with its ventilation running, and wear the respirator and gloves your site specifies.", "Lacquer and its vapour burn: no flames, sparks or smoking near the booth; keep rags in the closed bin.", LIFT],
  oven: ["The stoving oven is hot and holds solvent vapour: follow its purge and loading rules, and wear heat-resistant gloves.", "Fire risk: keep the area clear and the extinguisher within reach.", LIFT],
  flatting: ["Flatting back raises fine lacquer dust: run the extraction and wear a mask.", LIFT],
  cure: ["Curing racks carry heavy cabinets: load from the bottom up and keep the racks stable.", LIFT],
  polish: ["Polishing wheels can grab: keep loose clothing and hair clear, and hold the work firmly.", "Polishing dust and compound: run the extraction; wear eye protection.", LIFT],
  "metal-sanding": [
    "Sanding metal raises fine metal dust and sparks: run the extraction, keep the bench clear of solvent rags, and wear the eye protection and mask your site specifies.",
    "Machined edges are sharp: wear cut-resistant gloves when handling housings and plinths.",
  ],
  paint: [
    "Solvent paint vapour: paint only where the ventilation runs, and wear the respirator and gloves your site specifies.",
    "Paint and its vapour burn: no flames, sparks or smoking near the bench; keep rags in the closed bin.",
  ],
  finish: ["Polishing compounds and solvents: use gloves and keep the area ventilated.", LIFT],
};
