import { cleanup } from "@testing-library/react";
import { afterEach } from "vitest";

// Testing Library unmounts between tests only when told to (vitest runs without globals).
afterEach(() => cleanup());
