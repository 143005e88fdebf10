import "@fontsource-variable/source-sans-3";
import "./styles/fonts.css";
import "./index.css";
import "@shared/schemas/messages";
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { AppProvider } from "@/app/provider";
import { AppRouter } from "@/app/router";
import { applyTheme, readThemeChoice } from "@/lib/theme";

applyTheme(readThemeChoice());

createRoot(document.getElementById("root")!).render(
  <StrictMode>
    <AppProvider>
      <AppRouter />
    </AppProvider>
  </StrictMode>,
);
