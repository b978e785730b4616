import "@fontsource-variable/inter";
import "@fontsource/ibm-plex-mono/400.css";
import "@fontsource/ibm-plex-mono/500.css";
import "./index.css";
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { AppProvider } from "@/app/provider";
import { createAppRouter } from "@/app/router";
import { createQueryClient } from "@/lib/query-client";

const queryClient = createQueryClient();
const router = createAppRouter(queryClient);

const container = document.getElementById("root");
if (!container) throw new Error("index.html lacks the #root element.");

createRoot(container).render(
  <StrictMode>
    <AppProvider queryClient={queryClient} router={router} />
  </StrictMode>,
);
