import "server-only";
import { LOCAL_VIEWER, type Viewer } from "@/lib/auth/visibility";

/**
 * Who is looking at the page or calling the API. Every page, action and route handler asks
 * here, so accounts and sharing change this one function only.
 */
export async function getViewer(): Promise<Viewer> {
  return LOCAL_VIEWER;
}
