/** The header that names the workspace a message was sent for (read by the demo's fake SMTP server). */
export const WORKSPACE_HEADER = "X-Slabwright-Workspace";
