# Values for optim/formula_test.go, worked with exact rational arithmetic.
# A calculator only: Python 3 (standard library fractions and math; run
# with Python 3.11), no other library. Each block follows the textbook
# formula written in the test's comment; run `python3 formula_values.py`.
from fractions import Fraction as F
import math
A=[F(1),F(4)]
def grad(x): return [A[i]*x[i] for i in range(2)]
def dot(a,b): return sum(p*q for p,q in zip(a,b))
def f(x): return dot(x,[A[i]*x[i] for i in range(2)])/2
print("== CG")
for x0 in ([F(6,5),F(2,5)],[F(3),F(1)]):
    g0=grad(x0); d0=[-v for v in g0]
    a0 = F(1,2) if x0[0]==F(6,5) else F(1,5)  # 1/‖g0‖: ‖g0‖ = 2 or 5
    x1=[x0[i]+a0*d0[i] for i in range(2)]; g1=grad(x1)
    gd0=dot(g0,d0); dphi=dot(g1,d0)
    print("x0",x0,"x1",x1,"g1",g1,"f0",f(x0),"f1",f(x1),"dphi0",gd0,"dphi(a)",dphi, "armijo", f(x1) <= f(x0)+F(1,10000)*a0*gd0, "curv", abs(dphi) <= F(9,10)*abs(gd0))
    gg=dot(g0,g0); gg1=dot(g1,g1); g1g=dot(g1,g0); y=[g1[i]-g0[i] for i in range(2)]; dy=dot(d0,y)
    print(" gg",gg,"gg1",gg1,"g1g",g1g,"y",y,"dy",dy)
    betas={"PR+":max(F(0),(gg1-g1g)/gg),"FR":gg1/gg,"HS":(gg1-g1g)/dy,"DY":gg1/dy}
    for k,b in betas.items():
        d1=[-g1[i]+b*d0[i] for i in range(2)]; gd1=dot(g1,d1)
        if b==0 or gd1>=0:
            d1=[-v for v in g1]; gd1=-gg1
        a1=a0*gd0/gd1
        p=[x1[i]+a1*d1[i] for i in range(2)]
        print(" ",k,"beta",b,float(b),"d1",d1,"gd1",gd1,"a1",a1,float(a1),"trial",p,[repr(float(v)) for v in p])
print("== LBFGS")
x0=[F(6,5),F(2,5)]; g0=grad(x0); d0=[-v for v in g0]; a0=F(1,2)
x1=[x0[i]+a0*d0[i] for i in range(2)]; g1=grad(x1)
s=[x1[i]-x0[i] for i in range(2)]; y=[g1[i]-g0[i] for i in range(2)]
sy=dot(s,y); yy=dot(y,y); gamma=sy/yy; rho=1/sy
q=list(g1); al=rho*dot(s,q); q=[q[i]-al*y[i] for i in range(2)]
r=[gamma*v for v in q]; be=rho*dot(y,r); r=[r[i]+(al-be)*s[i] for i in range(2)]
d1=[-v for v in r]
print("s",s,"y",y,"sy",sy,"yy",yy,"gamma",gamma,"rho",rho,"alpha",al,"q",q,"r0",[gamma*v for v in q],"beta",be,"d1",d1,[float(v) for v in d1])
t=[x1[i]+d1[i] for i in range(2)]
print("trial x1+d1",t,[repr(float(v)) for v in t])
# explicit H check: H1 = (I - rho s y^T) gamma I (I - rho y s^T) + rho s s^T
H=[[gamma*(1 if i==j else 0) for j in range(2)] for i in range(2)]
V=[[ (1 if i==j else 0) - rho*y[i]*s[j] for j in range(2)] for i in range(2)]  # V = I - rho y s^T
def mm(a,b): return [[sum(a[i][k]*b[k][j] for k in range(2)) for j in range(2)] for i in range(2)]
def tr(a): return [[a[j][i] for j in range(2)] for i in range(2)]
H1=mm(mm(tr(V),H),V); H1=[[H1[i][j]+rho*s[i]*s[j] for j in range(2)] for i in range(2)]
print("H1 g1 ->", [-sum(H1[i][j]*g1[j] for j in range(2)) for i in range(2)])
print("== Adam")
def adam(x0, eta, b1, b2, eps, decay, iters):
    x=list(map(float,x0)); m=[0.0,0.0]; v=[0.0,0.0]; p1=p2=1.0; out=[]
    for e in range(iters):
        et=eta/(1+decay*e)
        g=[1.0*x[0],4.0*x[1]]
        p1*=b1; p2*=b2
        for i in range(2):
            m[i]=b1*m[i]+(1-b1)*g[i]; v[i]=b2*v[i]+(1-b2)*g[i]*g[i]
            mh=m[i]/(1-p1); vh=v[i]/(1-p2)
            x[i]-= et*mh/(math.sqrt(vh)+eps)
        out.append(list(x))
    return out
for args in ((0.1,0.9,0.999,0.5,0),(0.1,0.9,0.999,1e-8,0),(0.1,0.9,0.999,0.5,1)):
    print(args, [[repr(v) for v in p] for p in adam([1,1],*args,2)])
