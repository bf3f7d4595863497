import { EvidenceScreen } from "@/components/evidence/evidence-screen";

export default function EvidenceRoute() {
  return <EvidenceScreen />;
}
