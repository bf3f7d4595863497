import type { Express } from "express";
import request from "supertest";
import { testPassword } from "./test-app";

/** Sign in over HTTP and return an agent that keeps the session cookie. */
export async function signedInAgent(app: Express, email: string, password = testPassword) {
  const agent = request.agent(app);
  const res = await agent.post("/api/v1/session").send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}
