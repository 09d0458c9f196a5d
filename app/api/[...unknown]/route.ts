// Unknown API paths answer a JSON 404 instead of the HTML not-found page.
import { NextResponse } from "next/server";

const notFound = () => NextResponse.json({ error: "No such API endpoint.", code: "not_found" }, { status: 404 });
export { notFound as GET, notFound as POST, notFound as PUT, notFound as PATCH, notFound as DELETE };
