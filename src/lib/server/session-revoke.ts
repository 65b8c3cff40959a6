/**
 * Ends a person's sessions at once. Sessions are signed cookies; the middleware re-reads the user
 * from the database on every request, so a deactivated account is refused on its next request
 * whatever its cookie says. When server-side session records exist, revoke them here too.
 */
export async function endSessionsOf(_userId: number): Promise<void> {
  // Nothing more to do while sessions live only in cookies: the per-request lookup refuses them.
}
