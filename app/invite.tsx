import { lazyRoute } from "@/components/lazy";

export default lazyRoute(() => import("@/components/routes/invite"));
