// next-auth's endpoints (sign-in, session, sign-out). Outside proxy.ts like every route handler:
// a state-changing request from another origin is refused here, and the sign-in form's body is
// read with a small ceiling before next-auth sees it.
import NextAuth from "next-auth";
import { NextRequest } from "next/server";
import { authOptions } from "@/app/_server/auth";
import { readBodyBytes } from "@/app/_server/body-limit";
import { assertSameOrigin, errorResponse } from "@/app/_server/route";

const handler = NextAuth(authOptions);
const SIGN_IN_BODY_BYTES = 8 * 1024;

type Ctx = { params: Promise<{ nextauth: string[] }> };

async function post(request: NextRequest, ctx: Ctx) {
  let limited: NextRequest;
  try {
    assertSameOrigin(request);
    const body = await readBodyBytes(request, SIGN_IN_BODY_BYTES, "_");
    limited = new NextRequest(request.url, { method: "POST", headers: request.headers, body });
  } catch (err) {
    return errorResponse(err);
  }
  return handler(limited, ctx);
}

export { handler as GET, post as POST };
