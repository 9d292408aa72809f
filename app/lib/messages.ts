/** Messages shown both by server code and by components, kept where the browser bundle may import them. */
export const RESET_LINK_DEAD = "This reset link has expired or was already used. Ask for a new one.";
export const INVITE_DEAD = "This invitation has expired, was already accepted, or was replaced by a newer one.";
