export { seedDemo, demoAccounts, demoPassword } from "./seed-demo";
export { defaultTableSchema } from "./default-table-schema";
