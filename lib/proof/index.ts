/** The proof of every plate: an independent check of the exported files (see prove.ts). */
export {
  fillValue,
  provePlate,
  provePlateAsync,
  type Proof,
  type ProofFigures,
  type ProofInput,
  type ProofRule,
  type ProofRuleId,
} from "./prove";
